//! Warnings as data: a stable kebab-case code, the unit (or feed) it concerns, the value and
//! the limit it was held against (SI, with the kind of quantity they are), and a message
//! template. Text is made only when a report renders a warning ([`Warning::message`]), so a
//! study that meets a million warnings formats none of them unless it prints them, and a
//! caller (a sweep's CSV column, a script) reads the code and the numbers, not the words.
//!
//! Templates name their numbers `{value}`, `{limit}` and a free word `{subject}` (a species,
//! a reaction, a catalyst); [`Warning::message`] fills them in the units a plant engineer reads
//! (degC for temperatures, K for temperature differences, mol % for fractions).

use crate::quantity::{kelvin_to_degc, mol_s_to_kmol_h, pa_to_bar};

/// How a number is to be read; reports convert SI values to the units engineers read.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FigureKind {
    /// A fraction 0..1 (reported in %).
    Fraction,
    /// A mole fraction in parts per million by mole (stored as a fraction, reported in ppm).
    Ppm,
    /// An absolute temperature, K (reported in degC).
    Temperature,
    /// A temperature difference, K.
    TemperatureDifference,
    /// A molar flow, mol/s (reported in kmol/h).
    MolarFlow,
    /// A pressure, Pa (reported in bar abs).
    Pressure,
    /// A mass flow, kg/s (reported in kg/h; steam raised, water condensed).
    MassFlow,
    /// A heat flow, W (reported in kW; heat transferred, fired duty).
    Power,
    /// A pure number.
    Number,
}

impl FigureKind {
    /// The value in report units.
    pub fn to_report(self, si: f64) -> f64 {
        match self {
            FigureKind::Fraction => 100.0 * si,
            FigureKind::Ppm => 1e6 * si,
            FigureKind::Temperature => kelvin_to_degc(si),
            FigureKind::MolarFlow => mol_s_to_kmol_h(si),
            FigureKind::Pressure => pa_to_bar(si),
            FigureKind::MassFlow => 3600.0 * si,
            FigureKind::Power => si / 1e3,
            FigureKind::TemperatureDifference | FigureKind::Number => si,
        }
    }

    /// The report unit ("" for a pure number).
    pub fn report_unit(self) -> &'static str {
        match self {
            FigureKind::Fraction => "%",
            FigureKind::Ppm => "ppm",
            FigureKind::Temperature => "degC",
            FigureKind::TemperatureDifference => "K",
            FigureKind::MolarFlow => "kmol/h",
            FigureKind::Pressure => "bar abs",
            FigureKind::MassFlow => "kg/h",
            FigureKind::Power => "kW",
            FigureKind::Number => "",
        }
    }

    /// A value as text with its unit, at the precision a report shows.
    pub fn text(self, si: f64) -> String {
        let v = self.to_report(si);
        match self {
            FigureKind::Fraction => format!("{v:.4} mol %"),
            FigureKind::Ppm => format!("{v:.1} ppm"),
            FigureKind::Temperature => format!("{v:.1} degC"),
            FigureKind::TemperatureDifference => format!("{v:.1} K"),
            FigureKind::MolarFlow => format!("{v:.3} kmol/h"),
            FigureKind::Pressure => format!("{v:.3} bar abs"),
            FigureKind::MassFlow => format!("{v:.1} kg/h"),
            FigureKind::Power => format!("{v:.1} kW"),
            FigureKind::Number => format!("{v:.4}"),
        }
    }
}

/// One warning: what a unit or feed found outside common practice or worth a second look.
#[derive(Debug, Clone, PartialEq)]
pub struct Warning {
    /// The unit or feed it concerns (empty for the flowsheet as a whole); the flowsheet fills it
    /// in when it collects a unit's warnings.
    pub unit: String,
    /// Stable kebab-case code (`catalyst-temperature`, `carbon-formation`, ...).
    pub code: &'static str,
    /// The value found, SI (read by `kind`); `None` where there is none.
    pub value: Option<f64>,
    /// The limit it was held against, SI (read by `kind`); `None` where there is none.
    pub limit: Option<f64>,
    /// How `value` and `limit` are read.
    pub kind: FigureKind,
    /// A species, reaction or catalyst the message names, where there is one.
    pub subject: Option<String>,
    /// The message, with `{value}`, `{limit}` and `{subject}` where those go.
    pub template: &'static str,
}

impl Warning {
    /// A warning with a code and a template; add numbers with [`Warning::value`],
    /// [`Warning::limit`] and [`Warning::subject`].
    pub fn new(code: &'static str, template: &'static str) -> Warning {
        Warning {
            unit: String::new(),
            code,
            value: None,
            limit: None,
            kind: FigureKind::Number,
            subject: None,
            template,
        }
    }

    /// With the value found and how it is read.
    pub fn value(mut self, value: f64, kind: FigureKind) -> Warning {
        self.value = Some(value);
        self.kind = kind;
        self
    }

    /// With the limit (read like the value).
    pub fn limit(mut self, limit: f64) -> Warning {
        self.limit = Some(limit);
        self
    }

    /// With the species, reaction or catalyst it names.
    pub fn subject(mut self, subject: impl Into<String>) -> Warning {
        self.subject = Some(subject.into());
        self
    }

    /// For this unit or feed.
    pub fn for_unit(mut self, unit: impl Into<String>) -> Warning {
        self.unit = unit.into();
        self
    }

    /// The message text: the template with its numbers in report units.
    pub fn message(&self) -> String {
        let mut text = self.template.to_string();
        if let Some(v) = self.value {
            text = text.replace("{value}", &self.kind.text(v));
        }
        if let Some(l) = self.limit {
            text = text.replace("{limit}", &self.kind.text(l));
        }
        if let Some(s) = &self.subject {
            text = text.replace("{subject}", s);
        }
        text
    }

    /// The value in report units (for JSON and CSV), `None` where there is none.
    pub fn report_value(&self) -> Option<f64> {
        self.value.map(|v| self.kind.to_report(v))
    }

    /// The limit in report units, `None` where there is none.
    pub fn report_limit(&self) -> Option<f64> {
        self.limit.map(|v| self.kind.to_report(v))
    }
}

impl std::fmt::Display for Warning {
    /// "unit 'hts': message" (or the message alone for the flowsheet as a whole).
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        if self.unit.is_empty() {
            f.write_str(&self.message())
        } else {
            write!(f, "unit '{}': {}", self.unit, self.message())
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn message_fills_numbers_in_report_units() {
        let w = Warning::new(
            "catalyst-temperature",
            "outlet {value} is above {limit}, the usual limit of {subject}",
        )
        .value(773.15, FigureKind::Temperature)
        .limit(753.15)
        .subject("iron-chromium")
        .for_unit("hts");
        assert_eq!(
            w.message(),
            "outlet 500.0 degC is above 480.0 degC, the usual limit of iron-chromium"
        );
        assert_eq!(w.to_string(), format!("unit 'hts': {}", w.message()));
        assert_eq!(w.report_value(), Some(500.0));
        assert!((w.report_limit().unwrap() - 480.0).abs() < 1e-12);
        let f = Warning::new("x", "fraction {value}").value(0.005, FigureKind::Fraction);
        assert_eq!(f.message(), "fraction 0.5000 mol %");
        assert_eq!(f.report_limit(), None);
    }

    #[test]
    fn report_units() {
        // Exact definitions: degC = K - 273.15 (ISO 80000-5), 1 bar = 1e5 Pa,
        // 1 kmol/h = 1/3.6 mol/s.
        assert_eq!(FigureKind::Temperature.to_report(273.15), 0.0);
        assert_eq!(FigureKind::Pressure.to_report(2.5e5), 2.5);
        assert!((FigureKind::MolarFlow.to_report(1.0) - 3.6).abs() < 1e-12);
        assert_eq!(FigureKind::Ppm.to_report(1e-6), 1.0);
        assert_eq!(FigureKind::Fraction.report_unit(), "%");
    }
}
