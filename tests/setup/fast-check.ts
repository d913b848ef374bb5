// Property tests run with a fixed seed so a CI run is repeatable; set FC_SEED to explore others
// (a failure prints its seed and counterexample).
import fc from 'fast-check';

const seed = process.env.FC_SEED ? Number(process.env.FC_SEED) : 20261201;
fc.configureGlobal({ seed });
