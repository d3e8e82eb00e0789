"""Three identical mixing tanks in series (process plant).

Invented scenario. Identical tanks give a repeated eigenvalue with a single
eigenvector: A is defective, and the impulse response carries t and t^2 terms.
"""
q_over_v = 2  # outflow over tank volume, 1/min

A = [
    [-q_over_v, 0, 0],
    [q_over_v, -q_over_v, 0],
    [0, q_over_v, -q_over_v],
]
B = [[q_over_v], [0], [0]]
C = [[0, 0, 1]]
