//! Operating limits of the reactors, as warnings: temperature windows of each catalyst and of
//! the reformer, the margin of a shift or methanator inlet above its water dew point, the
//! smallest steam-to-carbon ratio at a reformer or pre-reformer inlet, and negative approach
//! temperatures. Each limit has a default from common practice (no single source; the figures
//! are those usually quoted in the trade, and no limit here replaces the catalyst supplier's or
//! the equipment designer's) and can be set per unit in the flowsheet file with the keys below,
//! which every reactor type documents for `syntrain unit-types`.
//!
//! Defaults (common practice):
//! - high-temperature shift (iron-chromium): inlet 320-380 degC, outlet at most 480 degC;
//! - medium-temperature shift (copper): inlet 200-240 degC, outlet at most 350 degC;
//! - low-temperature shift (copper): inlet 190-230 degC, outlet at most 260 degC;
//! - methanator (nickel): inlet 260-330 degC, outlet at most 450 degC;
//! - shift converter and methanator inlet at least 15 K above its water dew point;
//! - reformer outlet 700-950 degC, and not below its inlet;
//! - steam-to-carbon ratio at a reformer or pre-reformer inlet at least 2.5 (steam over the
//!   carbon of every hydrocarbon);
//! - an approach temperature below zero takes the outlet beyond equilibrium.
//!
//! A value exactly at a limit is inside it. Warnings are built only when a limit is crossed, so
//! a solve within every limit allocates nothing here.

use super::common::spec_error;
use super::unit::{KeyDoc, UnitBuilder, ValueKind};
use super::{FigureKind, Warning};
use crate::error::Result;
use crate::quantity::CELSIUS_OFFSET_K;

/// Default smallest margin of a shift or methanator inlet above its water dew point, K (common
/// practice: 15-20 K).
pub const DEW_POINT_MARGIN_K: f64 = 15.0;
/// Default smallest steam-to-carbon ratio at a reformer or pre-reformer inlet (common practice:
/// natural-gas plants run at about 2.5-3.5; below about 2.5 carbon formation and catalyst
/// damage become likely without a special catalyst).
pub const MIN_STEAM_TO_CARBON: f64 = 2.5;
/// Default reformer outlet window, K (common practice: 700-950 degC).
pub const REFORMER_OUTLET_MIN_K: f64 = 700.0 + CELSIUS_OFFSET_K;
/// See [`REFORMER_OUTLET_MIN_K`].
pub const REFORMER_OUTLET_MAX_K: f64 = 950.0 + CELSIUS_OFFSET_K;
/// Default methanator inlet window and outlet limit, K (common practice: inlet 260-330 degC,
/// outlet at most 450 degC).
pub const METHANATOR_INLET_MIN_K: f64 = 260.0 + CELSIUS_OFFSET_K;
/// See [`METHANATOR_INLET_MIN_K`].
pub const METHANATOR_INLET_MAX_K: f64 = 330.0 + CELSIUS_OFFSET_K;
/// See [`METHANATOR_INLET_MIN_K`].
pub const METHANATOR_OUTLET_MAX_K: f64 = 450.0 + CELSIUS_OFFSET_K;

/// Most temperatures a carbon path check may take.
pub const MAX_CARBON_PATH_POINTS: usize = 1000;

/// The limits a unit's file entry sets; `None` takes the unit type's default.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct OperatingLimits {
    /// Lowest inlet temperature, K (`inlet-min-temperature`).
    pub inlet_min_k: Option<f64>,
    /// Highest inlet temperature, K (`inlet-max-temperature`).
    pub inlet_max_k: Option<f64>,
    /// Lowest outlet temperature, K (`outlet-min-temperature`).
    pub outlet_min_k: Option<f64>,
    /// Highest outlet temperature, K (`outlet-max-temperature`).
    pub outlet_max_k: Option<f64>,
    /// Smallest inlet margin above the water dew point, K (`dew-point-margin`).
    pub dew_point_margin_k: Option<f64>,
    /// Smallest steam-to-carbon ratio at the inlet (`min-steam-to-carbon`).
    pub min_steam_to_carbon: Option<f64>,
    /// Temperatures of the carbon check along a reforming unit's path, inlet and outlet
    /// included (`carbon-path-points`; 0 checks the outlet gas only).
    pub carbon_path_points: Option<f64>,
}

/// One settable limit: its key and how it is written.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum LimitKey {
    InletMin,
    InletMax,
    OutletMin,
    OutletMax,
    DewPointMargin,
    MinSteamToCarbon,
    CarbonPathPoints,
}

impl LimitKey {
    /// The key as written in a file.
    pub(crate) fn key(self) -> &'static str {
        match self {
            LimitKey::InletMin => "inlet-min-temperature",
            LimitKey::InletMax => "inlet-max-temperature",
            LimitKey::OutletMin => "outlet-min-temperature",
            LimitKey::OutletMax => "outlet-max-temperature",
            LimitKey::DewPointMargin => "dew-point-margin",
            LimitKey::MinSteamToCarbon => "min-steam-to-carbon",
            LimitKey::CarbonPathPoints => "carbon-path-points",
        }
    }

    fn value(self) -> ValueKind {
        match self {
            LimitKey::DewPointMargin => ValueKind::TemperatureDifference,
            LimitKey::MinSteamToCarbon | LimitKey::CarbonPathPoints => ValueKind::Ratio,
            _ => ValueKind::Temperature,
        }
    }

    fn slot(self, l: &mut OperatingLimits) -> &mut Option<f64> {
        match self {
            LimitKey::InletMin => &mut l.inlet_min_k,
            LimitKey::InletMax => &mut l.inlet_max_k,
            LimitKey::OutletMin => &mut l.outlet_min_k,
            LimitKey::OutletMax => &mut l.outlet_max_k,
            LimitKey::DewPointMargin => &mut l.dew_point_margin_k,
            LimitKey::MinSteamToCarbon => &mut l.min_steam_to_carbon,
            LimitKey::CarbonPathPoints => &mut l.carbon_path_points,
        }
    }
}

/// The documentation of a limit key for a unit type's key list.
pub(crate) const fn key_doc(key: LimitKey, default: &'static str) -> KeyDoc {
    let (name, value, meaning) = match key {
        LimitKey::InletMin => (
            "inlet-min-temperature",
            ValueKind::Temperature,
            "lowest inlet temperature before a warning (operating window)",
        ),
        LimitKey::InletMax => (
            "inlet-max-temperature",
            ValueKind::Temperature,
            "highest inlet temperature before a warning (operating window)",
        ),
        LimitKey::OutletMin => (
            "outlet-min-temperature",
            ValueKind::Temperature,
            "lowest outlet temperature before a warning (operating window)",
        ),
        LimitKey::OutletMax => (
            "outlet-max-temperature",
            ValueKind::Temperature,
            "highest outlet temperature before a warning (operating window)",
        ),
        LimitKey::DewPointMargin => (
            "dew-point-margin",
            ValueKind::TemperatureDifference,
            "smallest margin of the inlet above its water dew point before a warning",
        ),
        LimitKey::MinSteamToCarbon => (
            "min-steam-to-carbon",
            ValueKind::Ratio,
            "smallest inlet steam-to-carbon ratio before a warning",
        ),
        LimitKey::CarbonPathPoints => (
            "carbon-path-points",
            ValueKind::Ratio,
            "temperatures of the carbon check along the path, inlet and outlet included (a \
             whole number, at least 2; 0 checks the outlet gas only, for studies that need \
             no carbon margin)",
        ),
    };
    KeyDoc {
        key: name,
        value,
        default: Some(default),
        meaning,
    }
}

/// Read the limit `keys` of an entry (each registered as an input where written), with `get`
/// the limits of the specification, and check them.
pub(crate) fn read<S: 'static>(
    b: &mut UnitBuilder<'_, '_, S>,
    keys: &[LimitKey],
    get: fn(&mut S) -> &mut OperatingLimits,
) -> Result<OperatingLimits> {
    let mut limits = OperatingLimits::default();
    for &k in keys {
        let v = b.number(k.key(), k.value(), None, move |s, v| {
            *k.slot(get(s)) = Some(v);
        })?;
        *k.slot(&mut limits) = v;
    }
    Ok(limits)
}

impl OperatingLimits {
    /// Refuse limits that cannot be meant: not finite, a negative margin or ratio, a window
    /// whose low end is above its high end.
    pub fn check(&self, unit: &str) -> Result<()> {
        let all = [
            (LimitKey::InletMin, self.inlet_min_k),
            (LimitKey::InletMax, self.inlet_max_k),
            (LimitKey::OutletMin, self.outlet_min_k),
            (LimitKey::OutletMax, self.outlet_max_k),
            (LimitKey::DewPointMargin, self.dew_point_margin_k),
            (LimitKey::MinSteamToCarbon, self.min_steam_to_carbon),
            (LimitKey::CarbonPathPoints, self.carbon_path_points),
        ];
        for (k, v) in all {
            if let Some(v) = v {
                let positive = matches!(k.value(), ValueKind::Temperature);
                if !v.is_finite() || v < 0.0 || (positive && v <= 0.0) {
                    return Err(spec_error(
                        unit,
                        k.key(),
                        format!("{v} must be finite and not negative"),
                    ));
                }
            }
        }
        if let Some(n) = self.carbon_path_points {
            if n.fract() != 0.0 || n == 1.0 || n > MAX_CARBON_PATH_POINTS as f64 {
                return Err(spec_error(
                    unit,
                    LimitKey::CarbonPathPoints.key(),
                    format!(
                        "{n} must be a whole number from 2 to {MAX_CARBON_PATH_POINTS}, or 0 to \
                         check the outlet gas only"
                    ),
                ));
            }
        }
        for (lo, hi, key) in [
            (self.inlet_min_k, self.inlet_max_k, LimitKey::InletMin),
            (self.outlet_min_k, self.outlet_max_k, LimitKey::OutletMin),
        ] {
            if let (Some(lo), Some(hi)) = (lo, hi) {
                if lo > hi {
                    return Err(spec_error(
                        unit,
                        key.key(),
                        format!(
                            "{:.2} degC is above the high end of its window, {:.2} degC",
                            lo - CELSIUS_OFFSET_K,
                            hi - CELSIUS_OFFSET_K
                        ),
                    ));
                }
            }
        }
        Ok(())
    }
}

/// A temperature window: `None` ends are open.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Window {
    pub min_k: Option<f64>,
    pub max_k: Option<f64>,
}

/// Which code a window breach raises.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum WindowCode {
    /// `catalyst-temperature`: a shift or methanator catalyst window.
    Catalyst,
    /// `reformer-temperature`: the reformer outlet window.
    Reformer,
}

impl WindowCode {
    fn warning(self, template: &'static str) -> Warning {
        match self {
            WindowCode::Catalyst => Warning::new("catalyst-temperature", template),
            WindowCode::Reformer => Warning::new("reformer-temperature", template),
        }
    }
}

/// The catalyst checks of a shift converter or methanator: the inlet within its window and the
/// outlet below its limit (each the file's value, else the default given for the catalyst:
/// `(inlet_min_k, inlet_max_k, outlet_max_k)`), and the inlet at least its margin above its
/// water dew point `dew_k`. `subject` names the catalyst in the messages.
#[allow(clippy::too_many_arguments)]
pub(crate) fn catalyst_warnings(
    unit: &str,
    limits: &OperatingLimits,
    defaults: (f64, f64, f64),
    subject: &'static str,
    t_in: f64,
    t_out: f64,
    dew_k: Option<f64>,
    warnings: &mut Vec<Warning>,
) {
    let (inlet_min, inlet_max, outlet_max) = defaults;
    let inlet = Window {
        min_k: Some(limits.inlet_min_k.unwrap_or(inlet_min)),
        max_k: Some(limits.inlet_max_k.unwrap_or(inlet_max)),
    };
    let outlet = Window {
        min_k: None,
        max_k: Some(limits.outlet_max_k.unwrap_or(outlet_max)),
    };
    let code = WindowCode::Catalyst;
    window_warnings(unit, code, Place::Inlet, t_in, inlet, subject, warnings);
    window_warnings(unit, code, Place::Outlet, t_out, outlet, subject, warnings);
    let margin = limits.dew_point_margin_k.unwrap_or(DEW_POINT_MARGIN_K);
    dew_point_warnings(unit, t_in, dew_k, margin, warnings);
}

/// Warn (`code`) when temperature `t` lies outside `window`; `place` ("inlet", "outlet") and
/// `subject` (what sets the window: a catalyst, "reformer") go into the message.
pub(crate) fn window_warnings(
    unit: &str,
    code: WindowCode,
    place: Place,
    t: f64,
    window: Window,
    subject: &'static str,
    warnings: &mut Vec<Warning>,
) {
    if let Some(lo) = window.min_k {
        if t < lo {
            let template = match place {
                Place::Inlet => {
                    "inlet {value} is below {limit}, the low end of the inlet window \
                                 of {subject} (common practice or set in the file)"
                }
                Place::Outlet => {
                    "outlet {value} is below {limit}, the low end of the outlet \
                                  window of {subject} (common practice or set in the file)"
                }
            };
            warnings.push(
                code.warning(template)
                    .value(t, FigureKind::Temperature)
                    .limit(lo)
                    .subject(subject)
                    .for_unit(unit),
            );
        }
    }
    if let Some(hi) = window.max_k {
        if t > hi {
            let template = match place {
                Place::Inlet => {
                    "inlet {value} is above {limit}, the high end of the inlet \
                                 window of {subject} (common practice or set in the file)"
                }
                Place::Outlet => {
                    "outlet {value} is above {limit}, the usual upper limit of \
                                  {subject} (common practice or set in the file)"
                }
            };
            warnings.push(
                code.warning(template)
                    .value(t, FigureKind::Temperature)
                    .limit(hi)
                    .subject(subject)
                    .for_unit(unit),
            );
        }
    }
}

/// Where a temperature is taken.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Place {
    Inlet,
    Outlet,
}

/// Warn (`dew-point`) when an inlet at `t_in` is at or below its water dew point `dew`, or less
/// than `margin_k` above it.
pub(crate) fn dew_point_warnings(
    unit: &str,
    t_in: f64,
    dew: Option<f64>,
    margin_k: f64,
    warnings: &mut Vec<Warning>,
) {
    let Some(dew) = dew else {
        return;
    };
    if t_in <= dew {
        warnings.push(
            Warning::new(
                "dew-point",
                "inlet {value} is at or below the water dew point {limit}: water would \
                 condense on the catalyst",
            )
            .value(t_in, FigureKind::Temperature)
            .limit(dew)
            .for_unit(unit),
        );
    } else if t_in - dew < margin_k {
        warnings.push(
            Warning::new(
                "dew-point",
                "inlet is only {value} above the water dew point; a catalyst is usually fed at \
                 least {limit} above it (common practice: 15-20 K)",
            )
            .value(t_in - dew, FigureKind::TemperatureDifference)
            .limit(margin_k)
            .for_unit(unit),
        );
    }
}

/// Warn (`steam-to-carbon`) when the inlet ratio `ratio` is below `min`.
pub(crate) fn steam_to_carbon_warning(
    unit: &str,
    ratio: f64,
    min: f64,
    warnings: &mut Vec<Warning>,
) {
    if ratio < min {
        warnings.push(
            Warning::new(
                "steam-to-carbon",
                "inlet steam-to-carbon ratio {value} is below {limit} (steam over the carbon of \
                 every hydrocarbon; common practice or set in the file): carbon formation and \
                 catalyst damage become likely",
            )
            .value(ratio, FigureKind::Number)
            .limit(min)
            .for_unit(unit),
        );
    }
}

/// Warn (`negative-approach`) for every reaction whose approach is below zero.
pub(crate) fn negative_approach_warnings(
    unit: &str,
    approaches: &[(&'static str, f64)],
    warnings: &mut Vec<Warning>,
) {
    for &(reaction, a) in approaches {
        if a < 0.0 {
            warnings.push(
                Warning::new(
                    "negative-approach",
                    "approach of {subject} is {value}, below {limit}: the outlet is taken \
                     beyond equilibrium, which no real bed reaches",
                )
                .value(a, FigureKind::TemperatureDifference)
                .limit(0.0)
                .subject(reaction)
                .for_unit(unit),
            );
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn windows_bite_at_their_ends() {
        // A value at the limit is inside; 0.01 K beyond is outside.
        let w = Window {
            min_k: Some(593.15),
            max_k: Some(653.15),
        };
        let count = |t: f64| {
            let mut list = Vec::new();
            window_warnings(
                "u",
                WindowCode::Catalyst,
                Place::Inlet,
                t,
                w,
                "x",
                &mut list,
            );
            list.len()
        };
        assert_eq!(count(593.15), 0);
        assert_eq!(count(653.15), 0);
        assert_eq!(count(593.14), 1);
        assert_eq!(count(653.16), 1);
        let mut list = Vec::new();
        steam_to_carbon_warning("u", 2.5, 2.5, &mut list);
        assert!(list.is_empty());
        steam_to_carbon_warning("u", 2.499, 2.5, &mut list);
        assert_eq!(list[0].code, "steam-to-carbon");
        let mut list = Vec::new();
        negative_approach_warnings("u", &[("shift", 0.0), ("reforming", -0.1)], &mut list);
        assert_eq!(list.len(), 1);
        assert_eq!(list[0].subject.as_deref(), Some("reforming"));
        let mut list = Vec::new();
        dew_point_warnings("u", 415.0, Some(400.0), 15.0, &mut list);
        assert!(list.is_empty());
        dew_point_warnings("u", 414.9, Some(400.0), 15.0, &mut list);
        assert_eq!(list.len(), 1);
        dew_point_warnings("u", 400.0, Some(400.0), 15.0, &mut list);
        assert_eq!(list[1].limit, Some(400.0));
    }

    #[test]
    fn limits_that_cannot_be_meant_are_refused() {
        let ok = OperatingLimits {
            inlet_min_k: Some(500.0),
            inlet_max_k: Some(600.0),
            ..Default::default()
        };
        assert!(ok.check("u").is_ok());
        let crossed = OperatingLimits {
            inlet_min_k: Some(600.0),
            inlet_max_k: Some(500.0),
            ..Default::default()
        };
        let e = crossed.check("u").unwrap_err().to_string();
        assert!(e.contains("inlet-min-temperature"), "{e}");
        let negative = OperatingLimits {
            dew_point_margin_k: Some(-1.0),
            ..Default::default()
        };
        assert!(negative.check("u").is_err());
    }
}
