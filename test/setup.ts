// Property-based tests draw their cases from one fixed seed, so a CI run is reproducible: a
// failure names its counterexample and fails again the same way. Change the seed (or set
// AXONLOOM_FC_SEED) to explore other cases locally.
import fc from 'fast-check';

fc.configureGlobal({ seed: Number(process.env.AXONLOOM_FC_SEED ?? 20261202) });
