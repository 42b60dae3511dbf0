/** OWASP's argon2id minimum: 19 MiB, 2 iterations, 1 lane. */
export const ARGON2_OPTIONS = {
  algorithm: 2 as const, // Algorithm.Argon2id; the package exports it as a const enum
  memoryCost: 19_456,
  timeCost: 2,
  parallelism: 1,
} as const;
