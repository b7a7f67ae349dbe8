//! `halfrail nearest VALUE --series E24`: the nearest standard value.

use halfrail::units::{format_eng, parse};
use halfrail::values::{nearest, series_of, Series};
use halfrail::wire::{to_json, NearestReport};
use halfrail::FieldError;

use super::Failure;

#[derive(clap::Args)]
pub struct Args {
    /// The value (`5k`, `4.7 uF`, `8k2`).
    #[arg(allow_hyphen_values = true)]
    value: String,
    /// The E-series: E3, E6, E12, E24, E48, E96 or E192.
    #[arg(long, default_value = "E24")]
    series: String,
    /// Print JSON instead of text.
    #[arg(long)]
    json: bool,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let series = Series::from_name(&args.series).ok_or_else(|| {
        FieldError::new("--series", format!("`{}` is not a series (E3, E6, E12, E24, E48, E96 or E192)", args.series))
    })?;
    let parsed = parse(&args.value).map_err(|e| e.within("value"))?;
    let found = nearest(parsed.value, series).map_err(|e| FieldError::new("value", e.reason))?;
    let members = series_of(parsed.value).map_err(|e| FieldError::new("value", e.reason))?;
    if args.json {
        let report = NearestReport { found: &found, unit: parsed.unit, member_of: &members };
        return Ok(format!("{}\n", to_json(&report)));
    }
    let show = |v: f64| format_eng(v, parsed.unit, 3);
    let tolerance = series.tolerances_pct()[0];
    Ok(format!(
        "{} in {} (±{tolerance} %): nearest {} ({:+.2} %), below {}, above {}\n",
        show(parsed.value),
        series.name(),
        show(found.nearest),
        found.error_pct,
        show(found.below),
        show(found.above),
    ))
}
