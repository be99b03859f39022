import fc from 'fast-check';

/**
 * CI replays the property tests with one fixed seed, so whether a submission lands never depends
 * on luck; every other run explores fresh seeds. FC_SEED replays a seed a failure printed.
 */
const seed = process.env.FC_SEED ?? (process.env.CI ? '20261202' : undefined);
if (seed !== undefined) fc.configureGlobal({ seed: Number(seed) });
