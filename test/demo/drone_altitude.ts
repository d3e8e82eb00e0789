// Altitude hold of a small quadrotor, discrete closed loop at 100 Hz.
// Invented scenario: gains and sample period are made up for this demo.
// States: altitude error [m], climb rate [m/s].

// eigenlens: discrete period=0.01
const A_d = [
  [1, 0.01],
  [-0.02, 0.97],
] as const;

const B_d = [[0.00005], [0.01]];
const C_d = [[1, 0]];
