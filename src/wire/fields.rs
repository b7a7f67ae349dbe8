//! The catalogue of the document's fields (`doc::fields`) as the page reads it:
//! `{"part.vdd_v": {"label", "name", "unit", "hint"}, …}`, keyed by each field's
//! path (`[]` for a list's items: `chain.blocks[].loss_db`), so that the page's
//! forms and tables take their words from the one place that spells the keys.

use serde::ser::{SerializeMap, Serializer};
use serde::Serialize;

use crate::doc::fields::{Field, ALL};

/// One field: how the page labels it in its form, how a panel names it away from
/// the form, the unit of its number (`Ω`; empty for none) and the hint.
#[derive(Serialize)]
struct FieldOut {
    label: &'static str,
    name: &'static str,
    unit: &'static str,
    hint: &'static str,
}

impl From<&Field> for FieldOut {
    fn from(f: &Field) -> Self {
        FieldOut { label: f.label, name: f.name(), unit: f.key.unit.symbol(), hint: f.hint }
    }
}

/// Every field of the document, by path, in reading order.
pub struct FieldsOut;

impl Serialize for FieldsOut {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut map = serializer.serialize_map(Some(ALL.len()))?;
        for field in ALL {
            map.serialize_entry(&field.path(), &FieldOut::from(*field))?;
        }
        map.end()
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn the_page_reads_each_field_by_its_path() {
        let fields = serde_json::to_value(super::FieldsOut).unwrap();
        let supply = &fields["part.vdd_v"];
        assert_eq!((supply["label"].as_str(), supply["name"].as_str(), supply["unit"].as_str()), (Some("Supply"), Some("Supply Vdd"), Some("V")));
        assert_eq!(fields["stage.r_fb_ohm"]["unit"], "Ω");
        assert_eq!(fields["bench.vdd_v"]["label"], "Supply at the bench");
        assert_eq!(fields["tolerance.vt_mv"]["unit"], "mV");
        assert_eq!(fields["chain.blocks[].loss_db"]["label"], "Loss");
    }
}
