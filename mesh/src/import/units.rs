//! Length units of an STL file and their factor to metres.

use std::fmt;
use std::str::FromStr;

use serde::Serialize;

/// The length unit the STL coordinates are written in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum LengthUnit {
    /// Metres.
    M,
    /// Centimetres.
    Cm,
    /// Millimetres (the usual unit of scans).
    #[default]
    Mm,
    /// Inches (exactly 25.4 mm, by the international yard of 1959).
    In,
}

impl LengthUnit {
    /// Factor from this unit to metres.
    pub fn to_metres(self) -> f64 {
        match self {
            Self::M => 1.0,
            Self::Cm => 0.01,
            Self::Mm => 0.001,
            Self::In => 0.0254,
        }
    }

    /// The unit's name in words, plural ("millimetres").
    pub fn name(self) -> &'static str {
        match self {
            Self::M => "metres",
            Self::Cm => "centimetres",
            Self::Mm => "millimetres",
            Self::In => "inches",
        }
    }

    /// The unit's symbol.
    pub fn symbol(self) -> &'static str {
        match self {
            Self::M => "m",
            Self::Cm => "cm",
            Self::Mm => "mm",
            Self::In => "in",
        }
    }
}

impl fmt::Display for LengthUnit {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.symbol())
    }
}

/// A unit name that is not one of `m`, `cm`, `mm`, `in`.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("unknown length unit `{0}`: use m, cm, mm or in")]
pub struct UnknownUnit(pub String);

impl FromStr for LengthUnit {
    type Err = UnknownUnit;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim() {
            "m" => Ok(Self::M),
            "cm" => Ok(Self::Cm),
            "mm" => Ok(Self::Mm),
            "in" => Ok(Self::In),
            other => Err(UnknownUnit(other.to_string())),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn units_parse_and_scale() {
        assert_eq!("mm".parse::<LengthUnit>(), Ok(LengthUnit::Mm));
        assert!("ft".parse::<LengthUnit>().is_err());
        // 1 in = 25.4 mm exactly (international yard and pound agreement, 1959).
        assert!((LengthUnit::In.to_metres() - 25.4 * LengthUnit::Mm.to_metres()).abs() < 1e-15);
    }
}
