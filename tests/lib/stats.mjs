// Small helpers of the timing scripts in tests/bench/: a numeric flag and
// order statistics of a list of times.

/** The number after `name` on the command line, or `dflt`. */
export const arg = (name, dflt) => {
  const i = process.argv.indexOf(name);
  return i > 0 ? Number(process.argv[i + 1]) : dflt;
};

/** The median (the mean of the two middle values for an even count). */
export const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

/** The p-quantile by the nearest rank below. */
export const pct = (xs, p) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(p * xs.length))];
