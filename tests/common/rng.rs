//! The seeded generator the tests draw their random cases from: one ChaCha8 for
//! all of them (as tests/common/domain.rs draws documents), so a seed names the
//! same case on every machine and every run.

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

pub fn seeded(seed: u64) -> ChaCha8Rng {
    ChaCha8Rng::seed_from_u64(seed)
}

/// Log-uniform in [`low`, `high`): component values spread over decades.
pub fn log_uniform(rng: &mut ChaCha8Rng, low: f64, high: f64) -> f64 {
    rng.random_range(low.ln()..high.ln()).exp()
}

/// Approximately standard normal: the sum of 12 uniforms on [0, 1) less 6.
pub fn normal(rng: &mut ChaCha8Rng) -> f64 {
    (0..12).map(|_| rng.random::<f64>()).sum::<f64>() - 6.0
}
