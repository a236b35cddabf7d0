//! The plant's energy figures and its heat balance, from the streams and the unit figures.
//!
//! Heating values are lower heating values at 298.15 K (water as vapour), worked out from the
//! species data by complete combustion ([`crate::units::combustion`]).
//!
//! Summary figures (every solve):
//! - feed LHV: the LHV of the feeds that go to a process unit, i.e. to a unit that heats no
//!   other (the hydrocarbons, and any hydrogen or CO, of the process feed), W;
//! - fuel LHV: the LHV of the feeds that go straight to a fired unit (one with `heats:`, a
//!   furnace): the make-up fuel; a tail gas made inside the plant is not a feed and is not
//!   counted again, W. A feed split between process and fuel by a splitter counts as feed;
//! - steam export: the pure water-vapour product streams, plus the `steam-raised` figure
//!   (kg/s) of every unit without a pure-water outlet stream (a boiler whose steam side lies
//!   outside the flowsheet), less the pure water-vapour feeds (process steam taken in), kg/s;
//! - net specific energy: (feed LHV + fuel LHV - steam export x steam credit) per normal cubic
//!   metre of hydrogen made (the summary's hydrogen made; Nm3 at 273.15 K and 101.325 kPa,
//!   DIN 1343), and the feed and the fuel each on their own, J/Nm3 (reported as GJ per
//!   1000 Nm3). None without hydrogen made.
//!
//! The steam credit is the energy one tonne of exported steam is worth (the fuel a boiler
//! would burn to raise it): `energy: {steam-credit: 2.9 GJ/t}` in the file, registered as the
//! input `energy.steam-credit` (J/kg, SI, like every input set through the library). Its
//! default of 2.9 GJ/t is common practice for medium- to high-pressure export steam (about
//! 2.8 GJ/t to raise it from feed water, over a boiler efficiency of about 0.9-0.95).
//!
//! Heat balance ([`heat_balance`]), on a lower-heating-value basis at 25 degC with water as
//! vapour: heats in are the LHV and the sensible heat above 25 degC of every feed, and every
//! positive unit duty; heats out the LHV and sensible heat of every product and every negative
//! duty (as a positive number). Sensible heat is H(T) - sum n_i h_i(298.15 K), so liquid water
//! counts its latent heat as negative. For species of C, H, O, N and noble gases, LHV + sensible
//! heat is H less the formation enthalpy of the stream's complete combustion products, which
//! depends on its atoms only; by the element balance, heats in less heats out is therefore the
//! flowsheet's energy-balance residual (H_feeds - H_products + sum of duties), shown on the
//! closing line. Flue gas products (outlets of a fired unit, and of units fed by flue gas alone)
//! are shown apart: their sensible heat is the flue gas loss. Transfers inside the plant are
//! listed beside the balance, not in its sums: heat fired (`fired-duty`), heat to the reformer
//! (`heat-to-reformer`), casing loss (`heat-loss`), steam raised (`heat-to-steam`), heat
//! recovered in exchangers (`heat-transferred`), CO2-removal heat (`removal-heat`).

use serde::{Deserialize, Deserializer};

use super::feeds::Feed;
use super::graph::FlowGraph;
use super::result::{FlowsheetResult, StreamSource};
use super::spec::FlowsheetUnit;
use crate::error::Result;
use crate::quantity::normal_molar_volume_m3_per_mol;
use crate::thermo::SpeciesDb;
use crate::units::combustion::{Combustion, REFERENCE_TEMPERATURE_K};
use crate::units::unit::{Param, ParamTable, ValueKind};
use crate::units::StreamPhase;

/// Default steam credit, J/kg (2.9 GJ/t; common practice).
pub const DEFAULT_STEAM_CREDIT_J_PER_KG: f64 = 2.9e6;

/// The input path of the steam credit.
pub const STEAM_CREDIT_INPUT: &str = "energy.steam-credit";

/// The file's `energy:` key.
#[derive(Debug, Clone, Copy, Default, Deserialize)]
#[serde(deny_unknown_fields, rename_all = "kebab-case")]
pub struct EnergyModel {
    /// Energy a kilogram of exported steam is worth, J/kg (`2.9 GJ/t`, `2.9 MJ/kg`,
    /// `2900 kJ/kg`).
    #[serde(default)]
    pub steam_credit: Option<SteamCredit>,
}

/// A steam credit as written, in J/kg.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SteamCredit(pub f64);

impl<'de> Deserialize<'de> for SteamCredit {
    fn deserialize<D: Deserializer<'de>>(d: D) -> std::result::Result<Self, D::Error> {
        let value = serde_norway::Value::deserialize(d)?;
        let text = super::yaml::scalar_text(&value)
            .ok_or_else(|| serde::de::Error::custom("give a steam credit such as 2.9 GJ/t"))?;
        parse_steam_credit(&text)
            .map(SteamCredit)
            .map_err(serde::de::Error::custom)
    }
}

/// "2.9 GJ/t" (also MJ/kg, kJ/kg, J/kg) to J/kg.
pub fn parse_steam_credit(text: &str) -> std::result::Result<f64, String> {
    let t = text.trim();
    let split = t
        .find(|c: char| !(c.is_ascii_digit() || matches!(c, '+' | '-' | '.' | 'e' | 'E')))
        .unwrap_or(t.len());
    let (number, unit) = (t[..split].trim(), t[split..].trim());
    let scale = match unit {
        "GJ/t" | "MJ/kg" => 1e6,
        "kJ/kg" => 1e3,
        "J/kg" => 1.0,
        "" => return Err(format!("'{t}': give the unit (GJ/t, MJ/kg, kJ/kg or J/kg)")),
        other => {
            return Err(format!(
                "'{t}': unknown unit '{other}'; use GJ/t, MJ/kg, kJ/kg or J/kg"
            ))
        }
    };
    match number.parse::<f64>() {
        Ok(x) if x.is_finite() && x >= 0.0 => Ok(x * scale),
        _ => Err(format!(
            "'{t}': the steam credit must be a number not below zero"
        )),
    }
}

/// What the energy figures of a flowsheet need, worked out once when it is read.
#[derive(Debug, Clone)]
pub(crate) struct EnergyTable {
    /// LHV of each database species at 298.15 K, J/mol (zeros when the data cannot burn).
    lhv: Vec<f64>,
    /// Database index and molar mass (kg/mol) of water.
    water: Option<(usize, f64)>,
    /// Per feed: true when it goes straight to a fired unit.
    fuel_feed: Vec<bool>,
    /// The slot of `energy.steam-credit`.
    steam_credit: Param,
}

impl EnergyTable {
    /// Register `energy.steam-credit` and note which feeds are fuel.
    pub(crate) fn new(
        db: &SpeciesDb,
        feeds: &[Feed],
        units: &[FlowsheetUnit],
        graph: &FlowGraph,
        model: &EnergyModel,
        params: &mut ParamTable,
    ) -> EnergyTable {
        let lhv = lhv_table(db);
        let fuel_feed = feeds
            .iter()
            .map(|f| {
                units
                    .iter()
                    .position(|u| u.inlets.contains(&f.name))
                    .is_some_and(|u| graph.heats.get(u).is_some_and(|h| !h.is_empty()))
            })
            .collect();
        let credit = model
            .steam_credit
            .map_or(DEFAULT_STEAM_CREDIT_J_PER_KG, |c| c.0);
        EnergyTable {
            lhv,
            water: db
                .water()
                .map(|w| (w, db.by_index(w).molar_mass_kg_per_mol)),
            fuel_feed,
            steam_credit: params.add(STEAM_CREDIT_INPUT.into(), credit, ValueKind::Ratio),
        }
    }
}

/// LHV of every species of `db`, J/mol (zeros when the data lack a combustion product).
fn lhv_table(db: &SpeciesDb) -> Vec<f64> {
    match Combustion::new(db) {
        Ok(c) => (0..db.len()).map(|i| c.lhv(i)).collect(),
        Err(_) => vec![0.0; db.len()],
    }
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// Set the energy figures of the summary of `result` (see the module docs). No allocation.
pub(crate) fn summary(
    t: &EnergyTable,
    _db: &SpeciesDb,
    params: &[f64],
    result: &mut FlowsheetResult,
) {
    let (mut feed, mut fuel, mut steam) = (0.0, 0.0, 0.0);
    let pure_steam = |s: &crate::units::Stream| {
        t.water
            .is_some_and(|(w, _)| s.phase == StreamPhase::Vapour && s.is_pure_water(w))
    };
    let water_mass = |s: &crate::units::Stream| t.water.map_or(0.0, |(w, m)| s.flows[w] * m);
    for (k, st) in result.streams.iter().enumerate() {
        if st.source == StreamSource::Feed {
            let lhv = dot(&st.stream.flows, &t.lhv);
            if t.fuel_feed.get(k).copied().unwrap_or(false) {
                fuel += lhv;
            } else if st.destination.is_some() {
                feed += lhv;
            }
            if pure_steam(&st.stream) {
                steam -= water_mass(&st.stream);
            }
        }
        if st.destination.is_none() && pure_steam(&st.stream) {
            steam += water_mass(&st.stream);
        }
    }
    for u in &result.units {
        let r = &u.result;
        let water_outlet = t
            .water
            .is_some_and(|(w, _)| r.outlets.iter().any(|o| o.is_pure_water(w)));
        if !water_outlet {
            steam += r
                .figures
                .iter()
                .filter(|f| f.key == "steam-raised")
                .map(|f| f.value)
                .sum::<f64>();
        }
    }
    let s = &mut result.summary;
    let credit = params.get(t.steam_credit.0).copied().unwrap_or(f64::NAN);
    s.feed_lhv_w = feed;
    s.fuel_lhv_w = fuel;
    s.steam_export_kg_s = steam;
    s.steam_credit_j_per_kg = credit;
    let nm3_s = s
        .hydrogen_made_mol_s
        .map(|n| n * normal_molar_volume_m3_per_mol())
        .filter(|v| *v > 0.0);
    s.net_specific_energy_j_per_nm3 = nm3_s.map(|v| (feed + fuel - steam * credit) / v);
    s.feed_specific_energy_j_per_nm3 = nm3_s.map(|v| feed / v);
    s.fuel_specific_energy_j_per_nm3 = nm3_s.map(|v| fuel / v);
}

/// One line of the heat balance: what, which unit or stream, and the heat, W.
#[derive(Debug, Clone, PartialEq)]
pub struct HeatLine {
    /// What the heat is ("feed LHV", "heat added").
    pub label: &'static str,
    /// The stream or unit it belongs to (empty for a total).
    pub name: String,
    /// Heat, W (a positive number for a heat in or out as the section says).
    pub heat_w: f64,
}

/// The plant heat balance (see the module docs).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct HeatBalance {
    /// Heats in: feed LHV and sensible heat, heat added by units.
    pub heats_in: Vec<HeatLine>,
    /// Heats out: product LHV and sensible heat (flue gas apart), heat removed by units.
    pub heats_out: Vec<HeatLine>,
    /// Transfers inside the plant, not part of the sums.
    pub transfers: Vec<HeatLine>,
    /// Sum of the heats in, W.
    pub total_in_w: f64,
    /// Sum of the heats out, W.
    pub total_out_w: f64,
}

impl HeatBalance {
    /// Heats in less heats out, W (the flowsheet's energy-balance residual).
    pub fn residual_w(&self) -> f64 {
        self.total_in_w - self.total_out_w
    }
}

/// Unit figures listed as transfers inside the plant: (figure key, label).
const TRANSFERS: [(&str, &str); 6] = [
    ("fired-duty", "heat fired (LHV)"),
    ("heat-to-reformer", "heat to the reformer"),
    ("heat-loss", "casing loss"),
    ("heat-to-steam", "steam raised"),
    ("heat-transferred", "heat recovered"),
    ("removal-heat", "CO2-removal heat"),
];

/// The heat balance of a solved flowsheet (see the module docs).
pub fn heat_balance(db: &SpeciesDb, result: &FlowsheetResult) -> Result<HeatBalance> {
    let lhv = lhv_table(db);
    let mut h298 = Vec::with_capacity(db.len());
    for s in db.all() {
        h298.push(if s.nasa7.in_range(REFERENCE_TEMPERATURE_K) {
            s.enthalpy(REFERENCE_TEMPERATURE_K)?
        } else {
            0.0
        });
    }
    // Flue gas: outlets of a fired unit, and of a unit whose inlets are all flue gas.
    let mut flue: Vec<&str> = Vec::new();
    for u in &result.units {
        let fired = u.result.figures.iter().any(|f| f.key == "fired-duty");
        let fed_by_flue =
            !u.inlets.is_empty() && u.inlets.iter().all(|i| flue.contains(&i.as_str()));
        if fired || fed_by_flue {
            flue.extend(u.outlets.iter().map(String::as_str));
        }
    }
    let mut b = HeatBalance::default();
    let mut feed_sensible = 0.0;
    let mut product_sensible = 0.0;
    for st in &result.streams {
        let flows = &st.stream.flows;
        let l = dot(flows, &lhv);
        let sensible = st.stream.enthalpy_w(db)? - dot(flows, &h298);
        let line = |label, heat_w| HeatLine {
            label,
            name: st.name.clone(),
            heat_w,
        };
        if st.source == StreamSource::Feed {
            if l != 0.0 {
                b.heats_in.push(line("feed LHV", l));
            }
            feed_sensible += sensible;
        }
        if st.destination.is_none() {
            if l != 0.0 {
                b.heats_out.push(line("product LHV", l));
            }
            if flue.contains(&st.name.as_str()) {
                b.heats_out
                    .push(line("flue gas loss (above 25 degC)", sensible));
            } else {
                product_sensible += sensible;
            }
        }
    }
    let total = |label, heat_w| HeatLine {
        label,
        name: String::new(),
        heat_w,
    };
    b.heats_in
        .push(total("feeds, sensible heat above 25 degC", feed_sensible));
    b.heats_out.push(total(
        "other products, sensible heat above 25 degC",
        product_sensible,
    ));
    for u in &result.units {
        let q = u.result.duty_w;
        let line = |label, heat_w| HeatLine {
            label,
            name: u.name.clone(),
            heat_w,
        };
        if q > 0.0 {
            b.heats_in.push(line("heat added", q));
        } else if q < 0.0 {
            b.heats_out.push(line("heat removed", -q));
        }
        for (key, label) in TRANSFERS {
            for f in u.result.figures.iter().filter(|f| f.key == key) {
                b.transfers.push(line(label, f.value));
            }
        }
    }
    b.total_in_w = b.heats_in.iter().map(|l| l.heat_w).sum();
    b.total_out_w = b.heats_out.iter().map(|l| l.heat_w).sum();
    Ok(b)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::flowsheet::result::{SolvedStream, SolvedUnit, Summary};
    use crate::units::{Figure, FigureKind, Stream, UnitResult};

    fn stream(name: &str, feed: bool, to: Option<&str>, s: Stream) -> SolvedStream {
        SolvedStream {
            name: name.into(),
            stream: s,
            source: if feed {
                StreamSource::Feed
            } else {
                StreamSource::Unit("u".into())
            },
            destination: to.map(str::to_string),
        }
    }

    #[test]
    fn steam_export_counts_products_raised_steam_and_imports() {
        let db = SpeciesDb::embedded().unwrap();
        let w = db.water().unwrap();
        let m_w = db.by_index(w).molar_mass_kg_per_mol;
        let pure = |n: f64, liquid: bool| {
            let mut f = vec![0.0; db.len()];
            f[w] = n;
            if liquid {
                Stream::liquid(f, 380.0, 40e5)
            } else {
                Stream::vapour(f, 700.0, 40e5)
            }
        };
        let mut ch4 = vec![0.0; db.len()];
        ch4[db.index_of("CH4").unwrap()] = 2.0;
        let streams = vec![
            // Process steam taken in (2 mol/s), boiler-feed water (liquid, not subtracted),
            // natural gas to the process, make-up fuel to a fired unit.
            stream("steam-in", true, Some("mix"), pure(2.0, false)),
            stream("bfw", true, Some("boiler"), pure(5.0, true)),
            stream(
                "ng",
                true,
                Some("mix"),
                Stream::vapour(ch4.clone(), 600.0, 30e5),
            ),
            stream(
                "fuel",
                true,
                Some("furnace"),
                Stream::vapour(ch4, 300.0, 3e5),
            ),
            // Steam leaving the plant (5 mol/s).
            stream("steam-out", false, None, pure(5.0, false)),
        ];
        let unit = |name: &str, outlets: Vec<Stream>, raised: f64| SolvedUnit {
            name: name.into(),
            type_name: "x".into(),
            inlets: Vec::new(),
            outlets: Vec::new(),
            result: UnitResult {
                outlets,
                figures: vec![Figure {
                    key: "steam-raised",
                    label: "steam raised",
                    value: raised,
                    kind: FigureKind::MassFlow,
                }],
                ..UnitResult::default()
            },
        };
        let units = vec![
            // A boiler with its steam side in the flowsheet: counted through its product.
            unit("boiler", vec![pure(5.0, false)], 5.0 * m_w),
            // One whose steam side lies outside: its 0.5 kg/s count.
            unit(
                "waste-heat",
                vec![Stream::vapour(vec![1.0; db.len()], 900.0, 1e5)],
                0.5,
            ),
        ];
        let mut result = FlowsheetResult {
            title: String::new(),
            streams,
            units,
            summary: Summary {
                hydrogen_made_mol_s: Some(10.0),
                ..Summary::default()
            },
            warnings: Vec::new(),
            element_balance_residual: 0.0,
            energy_balance_residual: 0.0,
            targets: Vec::new(),
            recycle: None,
        };
        let table = EnergyTable {
            lhv: lhv_table(&db),
            water: Some((w, m_w)),
            fuel_feed: vec![false, false, false, true],
            steam_credit: Param(0),
        };
        summary(&table, &db, &[2.9e6], &mut result);
        let s = &result.summary;
        let export = (5.0 - 2.0) * m_w + 0.5;
        assert!(
            (s.steam_export_kg_s - export).abs() < 1e-15,
            "{}",
            s.steam_export_kg_s
        );
        // 2 mol/s CH4 each; LHV 802.301 kJ/mol (NIST-JANAF, see units::combustion).
        assert!((s.feed_lhv_w / 2.0 / 802_301.0 - 1.0).abs() < 1e-4);
        assert_eq!(s.feed_lhv_w, s.fuel_lhv_w);
        // Per Nm3 of hydrogen (10 mol/s x 0.022414 m3/mol, DIN 1343).
        let nm3 = 10.0 * normal_molar_volume_m3_per_mol();
        let net = (2.0 * s.feed_lhv_w - export * 2.9e6) / nm3;
        assert!((s.net_specific_energy_j_per_nm3.unwrap() - net).abs() < 1e-9 * net);
        assert_eq!(s.steam_credit_j_per_kg, 2.9e6);
    }

    #[test]
    fn steam_credits_read_in_their_units() {
        assert_eq!(parse_steam_credit("2.9 GJ/t").unwrap(), 2.9e6);
        assert_eq!(parse_steam_credit("2.9 MJ/kg").unwrap(), 2.9e6);
        assert_eq!(parse_steam_credit("2900 kJ/kg").unwrap(), 2.9e6);
        assert!(parse_steam_credit("2.9")
            .unwrap_err()
            .contains("give the unit"));
        assert!(parse_steam_credit("2.9 GJ/h")
            .unwrap_err()
            .contains("unknown unit"));
        assert!(parse_steam_credit("-1 GJ/t").is_err());
    }
}
