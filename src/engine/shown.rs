//! How a number the user gave is written back in a message: as typed for
//! ordinary values, in scientific notation for the extreme ones (a
//! message must not spell 1e300 as three hundred digits).

use std::fmt;

/// A number in a message: whole numbers below 1e15 plainly ("40"),
/// magnitudes from 1e-4 to below 1e6 as Rust's shortest round-trip
/// decimal ("0.05"), others in scientific notation ("1e300", "5e-324");
/// not finite as "NaN", "inf", "-inf".
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Num(pub f64);

impl fmt::Display for Num {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let v = self.0;
        let a = v.abs();
        if !v.is_finite() || v == 0.0 {
            write!(f, "{v}")
        } else if v.fract() == 0.0 && a < 1e15 {
            write!(f, "{}", v as i64)
        } else if (1e-4..1e6).contains(&a) {
            write!(f, "{v}")
        } else {
            write!(f, "{v:e}")
        }
    }
}

#[cfg(test)]
mod tests {
    use super::Num;

    #[test]
    fn extreme_numbers_are_short() {
        for (v, want) in [(40.0, "40"), (0.05, "0.05"), (1e300, "1e300"), (5e-324, "5e-324"), (-2.5e-7, "-2.5e-7"), (1234567.5, "1.2345675e6"), (f64::NAN, "NaN"), (0.0, "0"), (1e15, "1e15")] {
            assert_eq!(Num(v).to_string(), want);
        }
    }
}
