//! Analyses of the stage, each in its own module, all on the one engine.

mod bias;
pub mod crystal;
pub mod design;
mod fit;
pub mod health;
mod response;
pub mod spread;
pub mod stability;
pub mod swing;
mod twoport;
mod transfer;

pub use bias::{bias, Bias, StageBias, Warning};
pub use transfer::{bare_curve, closed_loop_curve, stage_operating_point, BareCurve, BarePoint, Held, LoopPoint, SelfBias, Window, BARE_POINTS};
pub use fit::{chi2_bound, default_params, fit, judge, predict, round_to_uncertainty, starting_part, Fit, Fitted, Judgement, Param, Reading, Readings, Residual, DISAGREE_SIGMAS};
pub use response::{frequencies, frequency_count, solve_count, response, response_of, unwrapped_phase, LoopBreak, z_parameters, Linearised, Point, Response};
pub use twoport::{delta, injection, mu, output_noise, resistor_noise, rollett_k, NoiseSource, TwoPort, BOLTZMANN, T0_K};
