//! `halfrail convert VALUE --to UNIT [--at OHMS]` for signal levels, and
//! `halfrail mismatch VALUE --from FORM` for the four mismatch figures.

use halfrail::wire::{to_json, MismatchOut, ValueInUnit};
use halfrail::units::{convert_level, format_eng, format_fixed, mismatch, parse, parse_as, MismatchForm, Unit};
use halfrail::FieldError;

use super::Failure;

#[derive(clap::Args)]
pub struct Args {
    /// The level, with its unit: `-30 dBm`, `3.5 mVpp`, `2 uW`, `-20 dBV`.
    #[arg(allow_hyphen_values = true)]
    value: String,
    /// The unit wanted: W, dBm, dBW, Vrms, Vpk, Vpp, dBV or dBuV.
    #[arg(long)]
    to: String,
    /// The resistance the level is across.
    #[arg(long, default_value = "50", allow_hyphen_values = true)]
    at: String,
    /// Print JSON instead of text.
    #[arg(long)]
    json: bool,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let parsed = parse(&args.value).map_err(|e| e.within("value"))?;
    let from = parsed
        .unit
        .ok_or_else(|| FieldError::new("value", format!("`{}` needs a unit (dBm, Vpp, W, …)", args.value.trim())))?;
    let to = Unit::from_name(&args.to)
        .ok_or_else(|| FieldError::new("--to", format!("`{}` is not a unit", args.to)))?;
    let at = parse_as(&args.at, Unit::Ohm).map_err(|e| e.within("--at"))?;
    let value = convert_level(parsed.value, from, to, at).map_err(|e| match e.field.as_str() {
        "impedance_ohm" => FieldError::new("--at", e.reason),
        "to" => FieldError::new("--to", e.reason),
        _ => FieldError::new("value", e.reason),
    })?;
    Ok(if args.json {
        format!("{}\n", to_json(&ValueInUnit { value, unit: Some(to) }))
    } else {
        format!("{}\n", format_eng(value, Some(to), 3))
    })
}

#[derive(clap::Args)]
pub struct MismatchArgs {
    /// The figure, a plain number: `1.5` (VSWR), `14` (return loss, dB), `0.2` (|Γ|).
    #[arg(allow_hyphen_values = true)]
    value: String,
    /// What the number is: vswr, rl (return loss, dB), gamma (|Γ|) or ml (mismatch loss, dB).
    #[arg(long)]
    from: String,
    /// Print JSON instead of text.
    #[arg(long)]
    json: bool,
}

pub fn run_mismatch(args: MismatchArgs) -> Result<String, Failure> {
    let form = match args.from.to_ascii_lowercase().as_str() {
        "vswr" => MismatchForm::Vswr,
        "rl" => MismatchForm::ReturnLossDb,
        "gamma" => MismatchForm::Gamma,
        "ml" => MismatchForm::MismatchLossDb,
        other => return Err(FieldError::new("--from", format!("`{other}` is not vswr, rl, gamma or ml")).into()),
    };
    let value = parse(&args.value).map_err(|e| e.within("value"))?.value;
    let m = mismatch(form, value)?;
    Ok(if args.json {
        format!("{}\n", to_json(&MismatchOut(&m)))
    } else {
        let rl = m.return_loss_db.map_or("∞".to_string(), |rl| format_fixed(rl, 2));
        format!(
            "|Γ| {}  return loss {rl} dB  VSWR {}  mismatch loss {} dB\n",
            format_fixed(m.gamma, 4),
            format_fixed(m.vswr, 3),
            format_fixed(m.mismatch_loss_db, 3)
        )
    })
}
