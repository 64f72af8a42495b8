//! `dynamic.csv`: the complex stiffness found by the harmonic stages. One
//! row per stage and frequency: `stage`, `frequency`, then for every set and
//! component driven in any harmonic stage `<set>_<component>_storage`,
//! `<set>_<component>_loss` (force per length) and
//! `<set>_<component>_loss_angle` (degrees); a cell is empty where that
//! stage does not drive the set in that component.

use olli_solver::results::DynamicResult;

/// Name of the file in the output folder.
pub const DYNAMIC_FILE: &str = "dynamic.csv";

/// The text of `dynamic.csv` for `results`; `components` names the
/// analysis' components (`x`, `y`, `z`; `r`, `z`).
pub fn dynamic_csv(results: &[DynamicResult], components: &[&str]) -> String {
    let mut keys: Vec<(String, usize)> = Vec::new();
    for k in results.iter().flat_map(|r| &r.stiffness) {
        if !keys.iter().any(|(s, c)| s == &k.set && *c == k.component) {
            keys.push((k.set.clone(), k.component));
        }
    }
    let mut header = vec!["stage".to_string(), "frequency".to_string()];
    for (set, c) in &keys {
        let name = components.get(*c).copied().unwrap_or("?");
        for part in ["storage", "loss", "loss_angle"] {
            header.push(format!("{set}_{name}_{part}"));
        }
    }
    let mut text = header.join(",") + "\n";
    for r in results {
        for (i, f) in r.frequencies.iter().enumerate() {
            let mut row = vec![r.stage_name.clone(), format!("{f:e}")];
            for (set, c) in &keys {
                match r.stiffness.iter().find(|k| &k.set == set && k.component == *c) {
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
        let k = |set: &str, component| DynamicStiffness { set: set.into(), component, storage: vec![2.0], loss: vec![2.0] };
        let results = vec![
            DynamicResult { stage: 1, stage_name: "low".into(), frequencies: vec![1.0], stiffness: vec![k("top", 1)] },
            DynamicResult { stage: 3, stage_name: "high".into(), frequencies: vec![5.0], stiffness: vec![k("side", 0)] },
        ];
        let text = dynamic_csv(&results, &["x", "y"]);
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines[0], "stage,frequency,top_y_storage,top_y_loss,top_y_loss_angle,side_x_storage,side_x_loss,side_x_loss_angle");
        assert_eq!(lines[1], "low,1e0,2e0,2e0,4.5e1,,,");
        assert_eq!(lines[2], "high,5e0,,,,2e0,2e0,4.5e1");
    }
}
