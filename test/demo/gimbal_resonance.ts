// Two identical undamped flexible stages of a camera gimbal, the first driving the second.
// Invented scenario. Both stages ring at 2 rad/s; the coupling puts a Jordan block on the
// imaginary axis, so the response grows like t·sin(2t) even though no eigenvalue has Re > 0.

const omega = 2;

export const A: number[][] = [
  [0, 1, 0, 0],
  [-(omega ** 2), 0, 1, 0],
  [0, 0, 0, 1],
  [0, 0, -(omega ** 2), 0],
];

export const B: number[][] = [[0], [0], [0], [1]];
