"""Three heating zones of a small ceramics kiln, coupled through the walls.

Invented scenario: the coefficients are made up for this demo. Time is in seconds;
each zone's time constant is a few minutes, and the firmware runs this model at
10 kHz alongside the fast current loops. The discrete matrix Ad then sits very close
to the identity, and rounding it to float32 shifts the slow time constants:
eigenlens reports that as `float32-sensitive`.
"""
import numpy as np

# Zone temperatures above ambient, heater power as input.
# eigenlens: period=0.0001
A = np.array([
    [-1/100, 1/200, 0],
    [1/300, -1/120, 1/400],
    [0, 1/500, -1/150],
])
B = np.array([[1/100], [0], [0]])
C = np.array([[0, 0, 1]])
