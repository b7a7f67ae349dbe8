//! The frequency sweep as CSV: one row per frequency, a header of keys that carry
//! their unit, an empty field where a figure does not exist.

use crate::math;
use crate::units::voltage_ratio_db;
use super::push_row;
use crate::analysis::{mu, rollett_k, Response};

const HEADER: &str = "f_hz,gain_db,phase_deg,gt_db,group_delay_s,zin_re_ohm,zin_im_ohm,zout_re_ohm,zout_im_ohm,\
s11_db,s21_db,s12_db,s22_db,k,mu,nf_db,noise_in_v_per_rthz";

fn db(x: f64) -> Option<f64> {
    (x > 0.0).then(|| voltage_ratio_db(x))
}

/// The CSV text of a swept response.
pub fn sweep_csv(response: &Response) -> String {
    // About 190 bytes a row: one allocation for the whole text.
    let mut out = String::with_capacity(HEADER.len() + 1 + 200 * response.points.len());
    out.push_str(HEADER);
    out.push('\n');
    for (p, delay) in response.points.iter().zip(&response.group_delay_s) {
        let [[s11, s12], [s21, s22]] = p.s;
        let row = [
            Some(p.f_hz),
            Some(p.gain_db()),
            Some(p.phase_deg()),
            p.gt_db(),
            Some(*delay),
            p.zin.map(|z| z.re),
            p.zin.map(|z| z.im),
            Some(p.zout.re),
            Some(p.zout.im),
            db(math::norm(s11)),
            db(math::norm(s21)),
            db(math::norm(s12)),
            db(math::norm(s22)),
            Some(rollett_k(&p.s)),
            Some(mu(&p.s)),
            p.nf_db(),
            Some(p.noise_in_v_per_rthz()),
        ];
        push_row(&mut out, &row);
    }
    out
}
