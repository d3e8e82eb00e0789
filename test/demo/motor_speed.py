"""Speed loop of a small DC motor with a PI controller, closed loop.

Invented scenario: the motor constants below are made up for this demo.
States: armature current i [A], shaft speed w [rad/s], integrator state z.
"""
import numpy as np

R = 2.0        # armature resistance, ohm
L = 0.5        # armature inductance, H
K = 0.1        # torque and back-emf constant
J = 0.02       # rotor inertia, kg m^2
b = 0.2        # viscous friction, N m s
kp = 10        # proportional gain, V per rad/s
ki = 50        # integral gain

# Sampled at 1 kHz in the drive firmware:
# eigenlens: period=0.001
A_cl = np.array([
    [-R / L, -(K + kp) / L, ki / L],
    [K / J, -b / J, 0],
    [0, -1, 0],
])
B_cl = np.array([[kp / L], [0], [1]])
C_cl = np.array([[0, 1, 0]])
D_cl = np.array([[0]])
