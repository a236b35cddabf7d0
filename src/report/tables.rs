//! The tables of a solve report, built once from a [`FlowsheetResult`] and laid out by
//! [`super::solve_table`] (plain text for a terminal) and [`super::markdown`] (GitHub-flavoured
//! pipes), so both show the same figures.
//!
//! The stream table has the streams as columns, in blocks narrow enough for a terminal, and the
//! species as rows (only species present in some stream). Values leave in the units a plant
//! engineer reads: degC, bar abs (every pressure is absolute and labelled so), kmol/h, Nm3/h (ideal
//! gas at 273.15 K and 101 325 Pa, DIN 1343), kW, mol % wet and dry with fractions below 0.1 %
//! in ppm; the conversions are those of [`crate::quantity`].

use crate::error::Result;
use crate::flowsheet::result::{FlowsheetResult, SolvedStream, StreamSource};
use crate::quantity::{
    kelvin_to_degc, kg_s_to_kg_h, mol_s_to_kmol_h, mol_s_to_nm3_h, pa_to_bar, w_to_kw,
};
use crate::thermo::{mixture, SpeciesDb};
use crate::units::{Figure, FigureKind, StreamPhase};

/// Widest a line of the plain report may be, characters (a terminal of 100 columns).
pub const REPORT_WIDTH: usize = 100;
/// Indent of every table line in the plain layout, characters.
const TABLE_INDENT: usize = 2;
/// Widest a block of stream columns may grow before the next block starts, characters.
const BLOCK_WIDTH: usize = REPORT_WIDTH - TABLE_INDENT;
/// Most stream columns in one block.
const MAX_STREAMS_PER_BLOCK: usize = 6;
/// Space between columns in the plain layout, characters (used to size the blocks).
const COLUMN_GAP: usize = 2;

/// Labels of the stream rows above the compositions, matching [`stream_column`].
const STREAM_LABELS: [&str; 9] = [
    "from",
    "to",
    "phase",
    "temperature, degC",
    "pressure, bar abs",
    "water dew point, degC",
    "total, kmol/h",
    "total, Nm3/h",
    "mass, kg/h",
];

/// How a column is aligned.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// Text.
    Left,
    /// Numbers.
    Right,
}

/// One row of a table.
#[derive(Debug, Clone, PartialEq)]
pub enum Row {
    /// Ordinary cells, one per column.
    Cells(Vec<String>),
    /// A sub-heading spanning the row ("mol % wet").
    Group(String),
}

/// A titled table.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    /// Title shown above the table.
    pub title: String,
    /// Column headers.
    pub headers: Vec<String>,
    /// Alignment per column.
    pub align: Vec<Align>,
    /// The rows.
    pub rows: Vec<Row>,
}

impl Table {
    fn new(title: impl Into<String>, headers: &[&str], align: &[Align]) -> Table {
        Table {
            title: title.into(),
            headers: headers.iter().map(|h| h.to_string()).collect(),
            align: align.to_vec(),
            rows: Vec::new(),
        }
    }

    fn push(&mut self, cells: Vec<String>) {
        self.rows.push(Row::Cells(cells));
    }
}

/// Everything a text or markdown solve report shows, in order.
#[derive(Debug, Clone)]
pub struct SolveReport {
    /// The flowsheet title.
    pub title: String,
    /// A line saying whether the solution can be used (convergence of every unit).
    pub status: String,
    /// Stream blocks (streams as columns).
    pub streams: Vec<Table>,
    /// Units: type, duty, outlet temperature, approaches.
    pub units: Table,
    /// Key figures of each unit.
    pub figures: Table,
    /// Convergence of the equilibrium units (None when there are none).
    pub equilibrium: Option<Table>,
    /// Plant summary and balance checks.
    pub summary: Table,
    /// The plant heat balance ([`crate::flowsheet::energy::heat_balance`]).
    pub heat_balance: Table,
    /// The design targets met (None without targets).
    pub targets: Option<Table>,
    /// Warnings of the units and the flowsheet, as text.
    pub warnings: Vec<String>,
    /// The cautions printed with every result.
    pub cautions: String,
}

/// Build the report tables of a solved flowsheet.
pub fn build(db: &SpeciesDb, result: &FlowsheetResult) -> Result<SolveReport> {
    let species = present_species(result);
    Ok(SolveReport {
        title: result.title.clone(),
        status: status_line(result),
        streams: stream_blocks(db, result, &species),
        units: unit_table(result),
        figures: figure_table(result),
        equilibrium: equilibrium_table(result),
        summary: summary_table(db, result),
        heat_balance: super::energy::heat_balance_table(&crate::flowsheet::energy::heat_balance(
            db, result,
        )?),
        targets: target_table(result),
        warnings: result.warnings.iter().map(|w| w.to_string()).collect(),
        cautions: super::CAUTIONS.to_string(),
    })
}

/// Database indices of the species that flow in at least one stream, in database order.
pub fn present_species(result: &FlowsheetResult) -> Vec<usize> {
    let len = result
        .streams
        .iter()
        .map(|s| s.stream.flows.len())
        .max()
        .unwrap_or(0);
    (0..len)
        .filter(|&i| {
            result
                .streams
                .iter()
                .any(|s| s.stream.flows.get(i).is_some_and(|n| *n > 0.0))
        })
        .collect()
}

/// Where a stream comes from, for reports ("feed" or the unit name).
pub fn source_name(stream: &SolvedStream) -> &str {
    match &stream.source {
        StreamSource::Feed => "feed",
        StreamSource::Unit(unit) => unit,
    }
}

/// Where a stream goes, for reports (the unit name, or "product").
pub fn destination_name(stream: &SolvedStream) -> &str {
    stream.destination.as_deref().unwrap_or("product")
}

/// The phase word used in reports.
pub fn phase_name(phase: StreamPhase) -> &'static str {
    match phase {
        StreamPhase::Vapour => "vapour",
        StreamPhase::Liquid => "liquid",
    }
}

/// A figure converted to report units: (value, unit text).
///
/// Fraction -> %, Ppm -> ppm, Temperature -> degC, TemperatureDifference -> K,
/// MolarFlow -> kmol/h, Pressure -> bar abs, Number -> no unit.
pub fn figure_value(figure: &Figure) -> (f64, &'static str) {
    (
        figure.kind.to_report(figure.value),
        figure.kind.report_unit(),
    )
}

/// A figure's number in report units, rounded for reading ("3.214", "870.0").
pub fn figure_number(figure: &Figure) -> String {
    let (value, _) = figure_value(figure);
    match figure.kind {
        FigureKind::Fraction => percent(value),
        FigureKind::Ppm => fixed(value, 1),
        FigureKind::Temperature | FigureKind::TemperatureDifference => fixed(value, 1),
        FigureKind::MolarFlow => fixed(value, 2),
        FigureKind::Pressure => fixed(value, 2),
        FigureKind::MassFlow | FigureKind::Power => fixed(value, 1),
        FigureKind::Number => significant(value, 4),
    }
}

/// A number with `decimals` decimals; "n/a" when not finite.
pub fn fixed(value: f64, decimals: usize) -> String {
    if value.is_finite() {
        // Avoid "-0.0" for values that round to zero.
        let text = format!("{value:.decimals$}");
        if text
            .trim_start_matches('-')
            .chars()
            .all(|c| c == '0' || c == '.')
        {
            text.trim_start_matches('-').to_string()
        } else {
            text
        }
    } else {
        "n/a".to_string()
    }
}

/// A number with about `digits` significant digits, plain or in exponent form when very small or
/// large.
pub fn significant(value: f64, digits: usize) -> String {
    if !value.is_finite() {
        return "n/a".to_string();
    }
    if value == 0.0 {
        return "0".to_string();
    }
    let magnitude = value.abs().log10().floor() as i32;
    if !(-3..6).contains(&magnitude) {
        return format!("{value:.prec$e}", prec = digits.saturating_sub(1));
    }
    let decimals = (digits as i32 - 1 - magnitude).max(0) as usize;
    fixed(value, decimals)
}

/// A mole percentage: 3 decimals, exponent form below 0.0005 % (5 ppm), "-" for nothing at all.
pub fn percent(value: f64) -> String {
    if value == 0.0 {
        "-".to_string()
    } else if value.abs() < 5.0e-4 {
        format!("{value:.1e}")
    } else {
        fixed(value, 3)
    }
}

/// A mole fraction given in percent, for a stream table cell: like [`percent`] from 0.1 % up,
/// in parts per million below ("125 ppm", "3.40 ppm"), so small contents read without exponents.
pub fn mole_percent_cell(value: f64) -> String {
    if value == 0.0 {
        "-".to_string()
    } else if value.abs() < 0.1 {
        format!("{} ppm", significant(value * 1.0e4, 3))
    } else {
        fixed(value, 3)
    }
}

/// A residual in exponent form ("0" when exactly zero).
pub fn residual(value: f64) -> String {
    if value == 0.0 {
        "0".to_string()
    } else if value.is_finite() {
        format!("{value:.1e}")
    } else {
        "n/a".to_string()
    }
}

fn yes_no(flag: bool) -> String {
    if flag { "yes" } else { "NO" }.to_string()
}

/// A result exists only when every unit converged and the balances closed (anything else is an
/// error), so the status line says so and points to the residuals.
const STATUS_LINE: &str = "Every unit converged; balances below.";

/// The status line, with a sentence on the recycle where the flowsheet has cycles.
fn status_line(result: &FlowsheetResult) -> String {
    match &result.recycle {
        None => STATUS_LINE.to_string(),
        Some(r) => {
            let tears: Vec<String> = r.tear_streams.iter().map(|t| format!("'{t}'")).collect();
            format!(
                "{STATUS_LINE}\nRecycle {} after {} iterations (tear streams {}; largest \
                 scaled change {:.1e}).",
                r.termination,
                r.iterations,
                tears.join(", "),
                r.residual
            )
        }
    }
}

/// Stream columns split into blocks that fit a terminal.
fn stream_blocks(db: &SpeciesDb, result: &FlowsheetResult, species: &[usize]) -> Vec<Table> {
    let water = db.index_of("H2O");
    let dry_species: Vec<usize> = species
        .iter()
        .copied()
        .filter(|&i| Some(i) != water)
        .collect();
    // The label column: the widest row label (species rows are indented by two).
    let label_width = STREAM_LABELS
        .iter()
        .map(|l| l.len())
        .chain(species.iter().map(|&i| db.by_index(i).name.len() + 2))
        .max()
        .unwrap_or(0);

    let columns: Vec<Vec<String>> = result
        .streams
        .iter()
        .map(|s| stream_column(db, s, species, &dry_species))
        .collect();
    let widths: Vec<usize> = result
        .streams
        .iter()
        .zip(&columns)
        .map(|(s, col)| {
            col.iter()
                .map(|c| c.chars().count())
                .chain(std::iter::once(s.name.chars().count()))
                .max()
                .unwrap_or(0)
        })
        .collect();

    // Greedy packing of columns into blocks.
    let mut blocks: Vec<std::ops::Range<usize>> = Vec::new();
    let mut start = 0;
    let mut width = label_width;
    for (i, w) in widths.iter().enumerate() {
        let count = i - start;
        let full =
            count >= MAX_STREAMS_PER_BLOCK || (count > 0 && width + COLUMN_GAP + w > BLOCK_WIDTH);
        if full {
            blocks.push(start..i);
            start = i;
            width = label_width;
        }
        width += COLUMN_GAP + w;
    }
    if start < widths.len() {
        blocks.push(start..widths.len());
    }

    let total = result.streams.len();
    blocks
        .into_iter()
        .map(|range| {
            let title = if range.len() == total {
                "Streams".to_string()
            } else if range.len() == 1 {
                format!("Streams, {} of {total}", range.start + 1)
            } else {
                format!("Streams, {}-{} of {total}", range.start + 1, range.end)
            };
            block_table(
                title,
                db,
                &result.streams[range.clone()],
                &columns[range],
                species,
                &dry_species,
            )
        })
        .collect()
}

/// The cells of one stream column, top to bottom, matching the rows of [`block_table`].
fn stream_column(
    db: &SpeciesDb,
    s: &SolvedStream,
    species: &[usize],
    dry_species: &[usize],
) -> Vec<String> {
    let st = &s.stream;
    let mut cells = vec![
        source_name(s).to_string(),
        destination_name(s).to_string(),
        phase_name(st.phase).to_string(),
        fixed(kelvin_to_degc(st.temperature_k), 1),
        fixed(pa_to_bar(st.pressure_pa), 2),
        st.water_dew_point_k(db)
            .map_or_else(|| "-".to_string(), |t| fixed(kelvin_to_degc(t), 1)),
        fixed(mol_s_to_kmol_h(st.total()), 2),
        // Normal cubic metres are a gas measure; a liquid shows only kmol/h and kg/h.
        match st.phase {
            StreamPhase::Vapour => fixed(mol_s_to_nm3_h(st.total()), 0),
            StreamPhase::Liquid => "-".to_string(),
        },
        fixed(kg_s_to_kg_h(mixture::mass(db, &st.flows)), 0),
    ];
    cells.extend(
        species
            .iter()
            .map(|&i| mole_percent_cell(100.0 * st.mole_fraction(i))),
    );
    cells.extend(
        dry_species
            .iter()
            .map(|&i| mole_percent_cell(100.0 * st.dry_mole_fraction(db, i))),
    );
    cells
}

fn block_table(
    title: String,
    db: &SpeciesDb,
    streams: &[SolvedStream],
    columns: &[Vec<String>],
    species: &[usize],
    dry_species: &[usize],
) -> Table {
    let mut headers = vec!["stream".to_string()];
    headers.extend(streams.iter().map(|s| s.name.clone()));
    let mut align = vec![Align::Left];
    align.extend(std::iter::repeat_n(Align::Right, streams.len()));
    let mut table = Table {
        title,
        headers,
        align,
        rows: Vec::new(),
    };
    let row = |k: usize, label: String| {
        let mut cells = vec![label];
        cells.extend(columns.iter().map(|c| c[k].clone()));
        Row::Cells(cells)
    };
    let mut k = 0;
    for label in STREAM_LABELS {
        table.rows.push(row(k, label.to_string()));
        k += 1;
    }
    table.rows.push(Row::Group("mol % wet".to_string()));
    for &i in species {
        table
            .rows
            .push(row(k, format!("  {}", db.by_index(i).name)));
        k += 1;
    }
    table.rows.push(Row::Group("mol % dry".to_string()));
    for &i in dry_species {
        table
            .rows
            .push(row(k, format!("  {}", db.by_index(i).name)));
        k += 1;
    }
    table
}

/// One line per unit: type, duty, outlet temperature and the approach of each reaction.
fn unit_table(result: &FlowsheetResult) -> Table {
    use Align::{Left, Right};
    let mut table = Table::new(
        "Units",
        &["unit", "type", "duty, kW", "outlet, degC", "approach"],
        &[Left, Left, Right, Right, Left],
    );
    for unit in &result.units {
        let r = &unit.result;
        let outlet_t = r
            .outlets
            .first()
            .map(|s| fixed(kelvin_to_degc(s.temperature_k), 1))
            .unwrap_or_else(|| "-".to_string());
        let approaches: Vec<String> = r
            .approaches
            .iter()
            .map(|(reaction, dt)| format!("{reaction} {} K", fixed(*dt, 1)))
            .collect();
        table.push(vec![
            unit.name.clone(),
            unit.type_name.clone(),
            fixed(w_to_kw(r.duty_w), 1),
            outlet_t,
            if approaches.is_empty() {
                "-".to_string()
            } else {
                approaches.join(", ")
            },
        ]);
    }
    table
}

/// The key figures of every unit, grouped under the unit's name.
fn figure_table(result: &FlowsheetResult) -> Table {
    let mut table = Table::new(
        "Key figures",
        &["figure", "value", "unit"],
        &[Align::Left, Align::Right, Align::Left],
    );
    for unit in result.units.iter().filter(|u| !u.result.figures.is_empty()) {
        table.rows.push(Row::Group(unit.name.clone()));
        for f in &unit.result.figures {
            let unit = figure_value(f).1.to_string();
            table.push(vec![format!("  {}", f.label), figure_number(f), unit]);
        }
    }
    table
}

/// Convergence of every unit with an equilibrium stage.
fn equilibrium_table(result: &FlowsheetResult) -> Option<Table> {
    use Align::{Left, Right};
    let mut table = Table::new(
        "Equilibrium convergence",
        &[
            "unit",
            "converged",
            "iterations",
            "largest residual",
            "energy residual",
        ],
        &[Left, Left, Right, Right, Right],
    );
    for unit in &result.units {
        if let Some(eq) = &unit.result.equilibrium {
            // A unit solved as a real gas says so beside its name.
            let name = if eq.gas_model.is_ideal() {
                unit.name.clone()
            } else {
                format!("{} ({})", unit.name, eq.gas_model)
            };
            table.push(vec![
                name,
                yes_no(eq.converged()),
                (eq.iterations + eq.temperature_iterations).to_string(),
                residual(eq.max_residual()),
                residual(eq.energy_residual),
            ]);
        }
    }
    (!table.rows.is_empty()).then_some(table)
}

/// The gas leaving the purifiers as product: total flow (mol/s) and hydrogen mole fraction.
struct Product {
    total: f64,
    purity: f64,
}

/// The product of every purifier (its first outlet) taken together; None without a purifier or
/// without flow.
fn purifier_product(db: &SpeciesDb, result: &FlowsheetResult) -> Option<Product> {
    let h2 = db.index_of("H2")?;
    let mut total = 0.0;
    let mut hydrogen = 0.0;
    for unit in result.units.iter().filter(|u| u.type_name == "purifier") {
        if let Some(product) = unit.result.outlets.first() {
            total += product.total();
            hydrogen += product.flows.get(h2).copied().unwrap_or(0.0);
        }
    }
    (total > 0.0).then(|| Product {
        total,
        purity: hydrogen / total,
    })
}

/// The design targets: for each, a row with the input path and the value found (report units)
/// and a row with the result path, the value reached, the goal and its tolerance (the result
/// path's own unit), under a heading with the flowsheet solves it took.
fn target_table(result: &FlowsheetResult) -> Option<Table> {
    use Align::{Left, Right};
    if result.targets.is_empty() {
        return None;
    }
    let mut table = Table::new(
        "Targets",
        &["", "path", "value", "goal", "tolerance"],
        &[Left, Left, Right, Right, Right],
    );
    for (k, t) in result.targets.iter().enumerate() {
        let status = if t.met { "met" } else { "NOT met" };
        table.rows.push(Row::Group(format!(
            "target {}: {status}, {} flowsheet solves",
            k + 1,
            t.iterations
        )));
        let unit = t.input_kind.report_unit();
        let found = significant(t.input_kind.to_report(t.input_value), 6);
        table.push(vec![
            "vary".into(),
            t.input.clone(),
            if unit.is_empty() {
                found
            } else {
                format!("{found} {unit}")
            },
            String::new(),
            String::new(),
        ]);
        // Enough decimals to show the tolerance and one digit more.
        let decimals = (-t.tolerance.log10()).ceil().clamp(0.0, 12.0) as usize + 1;
        table.push(vec![
            "so that".into(),
            t.result.clone(),
            fixed(t.value, decimals),
            format!("{}", t.equals),
            format!("{:e}", t.tolerance),
        ]);
    }
    Some(table)
}

fn summary_table(db: &SpeciesDb, result: &FlowsheetResult) -> Table {
    use Align::{Left, Right};
    let s = &result.summary;
    let mut table = Table::new(
        "Summary",
        &["figure", "value", "unit"],
        &[Left, Right, Left],
    );
    let mut push = |label: String, value: String, unit: &str| {
        table.push(vec![label, value, unit.to_string()]);
    };
    match s.hydrogen_product_mol_s {
        Some(n) => {
            let h2 = "hydrogen contained in the product";
            push(h2.into(), fixed(mol_s_to_kmol_h(n), 2), "kmol/h");
            push(h2.into(), fixed(mol_s_to_nm3_h(n), 0), "Nm3/h");
            if let Some(product) = purifier_product(db, result) {
                let total = "product gas, total flow";
                push(
                    total.into(),
                    fixed(mol_s_to_kmol_h(product.total), 2),
                    "kmol/h",
                );
                push(
                    total.into(),
                    fixed(mol_s_to_nm3_h(product.total), 0),
                    "Nm3/h",
                );
                push(
                    "product purity, H2".into(),
                    fixed(100.0 * product.purity, 3),
                    "mol %",
                );
            }
        }
        None => push("hydrogen product".into(), "-".into(), "(no purifier)"),
    }
    if let Some(n) = s.hydrogen_made_mol_s {
        push(
            "hydrogen made".into(),
            fixed(mol_s_to_kmol_h(n), 2),
            "kmol/h",
        );
        push("hydrogen made".into(), fixed(mol_s_to_nm3_h(n), 0), "Nm3/h");
    }
    if let Some(r) = s.hydrogen_per_carbon_fed {
        push(
            "hydrogen made per carbon fed".into(),
            fixed(r, 3),
            "mol/mol",
        );
    }
    for (unit, y) in &s.methane_slip_dry {
        push(
            format!("methane slip, dry, {unit} outlet"),
            percent(100.0 * y),
            "mol %",
        );
    }
    for (unit, y) in &s.co_slip_dry {
        push(
            format!("CO slip, dry, {unit} outlet"),
            percent(100.0 * y),
            "mol %",
        );
    }
    for (unit, ratio) in &s.steam_to_carbon {
        push(
            format!("steam-to-carbon ratio, {unit} inlet"),
            fixed(*ratio, 2),
            "mol/mol",
        );
    }
    for (unit, margin) in &s.carbon_margin {
        push(format!("carbon margin, {unit}"), fixed(*margin, 3), "1 - a");
    }
    push(
        "heating duties, sum".into(),
        fixed(w_to_kw(s.heating_duty_w), 1),
        "kW",
    );
    push(
        "cooling duties, sum".into(),
        fixed(w_to_kw(s.cooling_duty_w), 1),
        "kW",
    );
    for (label, value, unit) in super::energy::summary_rows(s) {
        push(label, value, unit);
    }
    push(
        "element balance, largest relative error".into(),
        residual(result.element_balance_residual),
        "",
    );
    push(
        "energy balance, relative error".into(),
        residual(result.energy_balance_residual),
        "",
    );
    table
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::test_fixture::{fixture, with_db};

    #[test]
    fn number_formats() {
        assert_eq!(fixed(-0.01, 1), "0.0");
        assert_eq!(fixed(12.346, 2), "12.35");
        assert_eq!(fixed(f64::NAN, 2), "n/a");
        assert_eq!(significant(3.0, 4), "3.000");
        assert_eq!(significant(1234.6, 4), "1235");
        assert_eq!(significant(2.5e-5, 3), "2.50e-5");
        assert_eq!(percent(0.0), "-");
        assert_eq!(percent(12.3456), "12.346");
        assert_eq!(percent(1.0e-4), "1.0e-4");
        // Stream cells: ppm below 0.1 % (1 % = 10 000 ppm by definition).
        assert_eq!(mole_percent_cell(0.0), "-");
        assert_eq!(mole_percent_cell(0.1), "0.100");
        assert_eq!(mole_percent_cell(0.0125), "125 ppm");
        assert_eq!(mole_percent_cell(0.000_34), "3.40 ppm");
        assert_eq!(mole_percent_cell(99.9), "99.900");
    }

    /// A figure as the reports show it: number and unit.
    fn figure_text(figure: &Figure) -> String {
        match figure_value(figure).1 {
            "" => figure_number(figure),
            unit => format!("{} {unit}", figure_number(figure)),
        }
    }

    #[test]
    fn figures_convert_to_report_units() {
        let f = |value, kind| Figure {
            key: "k",
            label: "l",
            value,
            kind,
        };
        // ISO 80000-5: T/K = t/degC + 273.15.
        assert_eq!(
            figure_text(&f(1143.15, FigureKind::Temperature)),
            "870.0 degC"
        );
        assert_eq!(figure_text(&f(0.0321, FigureKind::Fraction)), "3.210 %");
        assert_eq!(figure_text(&f(5.0e-6, FigureKind::Ppm)), "5.0 ppm");
        // 1 mol/s = 3.6 kmol/h; 1 bar = 1e5 Pa (ISO 80000-4).
        assert_eq!(figure_text(&f(1.0, FigureKind::MolarFlow)), "3.60 kmol/h");
        assert_eq!(
            figure_text(&f(2.5e6, FigureKind::Pressure)),
            "25.00 bar abs"
        );
        assert_eq!(
            figure_text(&f(12.0, FigureKind::TemperatureDifference)),
            "12.0 K"
        );
        assert_eq!(figure_text(&f(3.0, FigureKind::Number)), "3.000");
    }

    #[test]
    fn only_present_species_and_blocks_fit() {
        with_db(|db| {
            let result = fixture(db);
            let names: Vec<&str> = present_species(&result)
                .into_iter()
                .map(|i| db.by_index(i).name.as_str())
                .collect();
            assert_eq!(names, ["CH4", "H2O", "H2", "CO", "CO2", "N2"]);
            let report = build(db, &result).unwrap();
            let streams: usize = report.streams.iter().map(|t| t.headers.len() - 1).sum();
            assert_eq!(streams, 10);
            assert!(report.streams.len() >= 2);
            assert!(report
                .streams
                .iter()
                .all(|t| t.headers.len() - 1 <= MAX_STREAMS_PER_BLOCK));
            // Dry rows leave water out.
            let dry_at = report.streams[0]
                .rows
                .iter()
                .position(|r| *r == Row::Group("mol % dry".into()))
                .unwrap();
            assert!(report.streams[0].rows[dry_at..]
                .iter()
                .all(|r| !matches!(r, Row::Cells(c) if c[0].trim() == "H2O")));
        });
    }
}
