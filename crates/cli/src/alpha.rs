//! Angle-of-attack lists on the command line: `-2,0,2.5` or an inclusive range `start:end:step`.
//!
//! Range values are computed as start + i·step (no accumulated round-off) and the end is
//! included when it lies within 1e-9 of a step multiple, so `0:1:0.1` gives 11 values ending at
//! exactly 1. Values are in degrees. Negative leading values work as `--alpha=-4:10:1` and as
//! `--alpha -4:10:1` (the argument accepts a leading hyphen).

/// Most angles one list may hold (guards against a mistyped step such as `0:10:1e-9`).
const MAX_VALUES: usize = 100_000;

fn number(text: &str) -> Result<f64, String> {
    let value: f64 = text
        .trim()
        .parse()
        .map_err(|_| format!("'{}' is not a number", text.trim()))?;
    if value.is_finite() {
        Ok(value)
    } else {
        Err(format!("'{}' is not a finite number", text.trim()))
    }
}

/// Angles of attack in degrees, in the order given.
#[derive(Debug, Clone, PartialEq)]
pub struct AlphaList(pub Vec<f64>);

/// Parses a comma list or an inclusive `start:end:step` range of angles in degrees.
pub fn parse_alpha_list(text: &str) -> Result<AlphaList, String> {
    parse_values(text).map(AlphaList)
}

fn parse_values(text: &str) -> Result<Vec<f64>, String> {
    let parts: Vec<&str> = text.split(':').collect();
    match parts.as_slice() {
        [single] => single.split(',').map(number).collect(),
        [start, end, step] => {
            let (start, end, step) = (number(start)?, number(end)?, number(step)?);
            if step == 0.0 {
                return Err("range step must not be zero".to_owned());
            }
            let intervals = (end - start) / step;
            if intervals < -1e-9 {
                return Err(format!(
                    "range {start}:{end} cannot be reached with step {step}"
                ));
            }
            let count = (intervals + 1e-9).floor() + 1.0;
            if count > MAX_VALUES as f64 {
                return Err(format!(
                    "range gives {count} values, at most {MAX_VALUES} allowed"
                ));
            }
            // count is a small positive integer here, so the cast is exact.
            Ok((0..count as usize)
                .map(|i| {
                    let value = start + i as f64 * step;
                    // Snap values within 1e-9 of a round 1e-9 multiple (float step noise).
                    let snapped = (value * 1e9).round() / 1e9;
                    if (snapped - value).abs() < 1e-9 {
                        snapped
                    } else {
                        value
                    }
                })
                .collect())
        }
        _ => Err("expected a list such as -2,0,2.5 or a range start:end:step".to_owned()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lists_and_ranges() {
        assert_eq!(parse_values("-2,0,2.5").unwrap(), vec![-2.0, 0.0, 2.5]);
        assert_eq!(parse_values("3").unwrap(), vec![3.0]);
        assert_eq!(
            parse_values("-4:4:2").unwrap(),
            vec![-4.0, -2.0, 0.0, 2.0, 4.0]
        );
        let tenths = parse_values("0:1:0.1").unwrap();
        assert_eq!(tenths.len(), 11);
        assert_eq!(tenths[3], 0.3);
        assert_eq!(tenths[10], 1.0);
        assert_eq!(parse_values("5:-5:-5").unwrap(), vec![5.0, 0.0, -5.0]);
        assert_eq!(parse_values("0:1:0.3").unwrap(), vec![0.0, 0.3, 0.6, 0.9]);
    }

    #[test]
    fn bad_input_is_explained() {
        assert_eq!(parse_values("1,x").unwrap_err(), "'x' is not a number");
        assert!(parse_values("0:5:0").unwrap_err().contains("zero"));
        assert!(parse_values("0:5:-1")
            .unwrap_err()
            .contains("cannot be reached"));
        assert!(parse_values("0:1e9:1e-3").unwrap_err().contains("at most"));
        assert!(parse_values("1:2").is_err());
        assert!(parse_values("nan").unwrap_err().contains("finite"));
    }
}
