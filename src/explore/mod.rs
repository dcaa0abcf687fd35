//! Design exploration: sweeps over design keys, requirements, ranking and
//! the Pareto front.
//!
//! (Skeleton: lands with the exploration issue.)
