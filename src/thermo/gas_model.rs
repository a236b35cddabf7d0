//! Which gas model an equilibrium stage uses: the ideal gas (activity y P / P0), or the
//! Peng-Robinson equation of state (activity phi y P / P0 with the fugacity coefficient phi of
//! [`super::peng_robinson`], and the residual enthalpy added to the ideal-gas enthalpy).

/// The gas model of a stage.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum GasModel {
    /// Ideal gas: phi = 1, no residual enthalpy.
    #[default]
    Ideal,
    /// Peng-Robinson (Peng & Robinson 1976), van der Waals mixing with zero binary parameters.
    PengRobinson,
}

impl GasModel {
    /// The names a flowsheet writes, in the order of the variants.
    pub const NAMES: [&'static str; 2] = ["ideal", "peng-robinson"];

    /// The name as written in flowsheets and reports.
    pub fn label(self) -> &'static str {
        match self {
            GasModel::Ideal => "ideal",
            GasModel::PengRobinson => "peng-robinson",
        }
    }

    /// The model of a name as written (`ideal`, `peng-robinson`); `None` for any other.
    pub fn from_label(label: &str) -> Option<GasModel> {
        match label {
            "ideal" => Some(GasModel::Ideal),
            "peng-robinson" => Some(GasModel::PengRobinson),
            _ => None,
        }
    }

    /// True for the ideal gas.
    pub fn is_ideal(self) -> bool {
        self == GasModel::Ideal
    }
}

impl std::fmt::Display for GasModel {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.label())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_read_back() {
        for name in GasModel::NAMES {
            assert_eq!(GasModel::from_label(name).map(GasModel::label), Some(name));
        }
        assert_eq!(GasModel::from_label("peng robinson"), None);
        assert_eq!(GasModel::default(), GasModel::Ideal);
    }
}
