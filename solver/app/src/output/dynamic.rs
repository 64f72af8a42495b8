//! `dynamic.csv`: the complex stiffness found by the harmonic stages. One
//! row per stage and frequency: `stage`, `frequency`, then for every set and
//! component driven in any harmonic stage `<set>_<component>_storage`,
//! `<set>_<component>_loss` (force per length) and
//! `<set>_<component>_loss_angle` (degrees), and for every insert component
//! driven or loaded in one `insert_<name>_<component>_storage`, `_loss`,
//! `_loss_angle` (components x, y, z, rx, ry, rz; force per length, moment
//! per radian); a cell is empty where that stage does not drive it.

use olli_solver::insert::COMPONENTS;
use olli_solver::results::{DynamicResult, DynamicStiffness};

/// Name of the file in the output folder.
pub const DYNAMIC_FILE: &str = "dynamic.csv";

/// The column prefix of one driven set or insert component.
fn prefix(k: &DynamicStiffness, components: &[&str]) -> String {
    if k.insert {
        format!("insert_{}_{}", k.set, COMPONENTS.get(k.component).copied().unwrap_or("?"))
    } else {
        format!("{}_{}", k.set, components.get(k.component).copied().unwrap_or("?"))
    }
}

/// The text of `dynamic.csv` for `results`; `components` names the
/// analysis' components (`x`, `y`, `z`; `r`, `z`).
pub fn dynamic_csv(results: &[DynamicResult], components: &[&str]) -> String {
    let mut keys: Vec<String> = Vec::new();
    for k in results.iter().flat_map(|r| &r.stiffness) {
        let key = prefix(k, components);
        if !keys.contains(&key) {
            keys.push(key);
        }
    }
    let mut header = vec!["stage".to_string(), "frequency".to_string()];
    for key in &keys {
        for part in ["storage", "loss", "loss_angle"] {
            header.push(format!("{key}_{part}"));
        }
    }
    let mut text = header.join(",") + "\n";
    for r in results {
        for (i, f) in r.frequencies.iter().enumerate() {
            let mut row = vec![r.stage_name.clone(), format!("{f:e}")];
            for key in &keys {
                match r.stiffness.iter().find(|k| &prefix(k, components) == key) {
                    Some(k) => {
                        row.push(format!("{:e}", k.storage[i]));
                        row.push(format!("{:e}", k.loss[i]));
                        row.push(format!("{:e}", k.loss_angle(i)));
                    }
                    None => row.extend(["".to_string(), "".to_string(), "".to_string()]),
                }
            }
            text += &(row.join(",") + "\n");
        }
    }
    text
}

#[cfg(test)]
mod tests {
    use super::*;
    use olli_solver::results::DynamicStiffness;

    #[test]
    fn columns_follow_the_contract_and_leave_undriven_cells_empty() {
        let k = |set: &str, component| DynamicStiffness { set: set.into(), component, storage: vec![2.0], loss: vec![2.0], insert: false };
        let pin = DynamicStiffness { set: "pin".into(), component: 5, storage: vec![1.0], loss: vec![0.0], insert: true };
        let results = vec![
            DynamicResult { stage: 1, stage_name: "low".into(), frequencies: vec![1.0], stiffness: vec![k("top", 1)] },
            DynamicResult { stage: 3, stage_name: "high".into(), frequencies: vec![5.0], stiffness: vec![k("side", 0), pin] },
        ];
        let text = dynamic_csv(&results, &["x", "y"]);
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(
            lines[0],
            "stage,frequency,top_y_storage,top_y_loss,top_y_loss_angle,side_x_storage,side_x_loss,side_x_loss_angle,\
             insert_pin_rz_storage,insert_pin_rz_loss,insert_pin_rz_loss_angle"
        );
        assert_eq!(lines[1], "low,1e0,2e0,2e0,4.5e1,,,,,,");
        assert_eq!(lines[2], "high,5e0,,,,2e0,2e0,4.5e1,1e0,0e0,0e0");
    }
}
