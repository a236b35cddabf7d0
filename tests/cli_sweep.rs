//! `syntrain sweep` through the real binary on temporary files: rows in case order, failed cases
//! written with their reason, the trends the physics demands, the same bytes on any thread count
//! and in any slicing, cases files, column choice, charts and percentiles.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

const DEMO: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/flowsheets/demo-train.yaml");

fn run(args: &[&str]) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .output()
        .expect("running the syntrain binary");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "{err}");
    out
}

/// A parsed CSV: header and rows of cells.
struct Csv {
    header: Vec<String>,
    rows: Vec<Vec<String>>,
}

impl Csv {
    fn parse(bytes: &[u8]) -> Csv {
        let mut reader = csv::Reader::from_reader(bytes);
        let header = reader.headers().unwrap().iter().map(String::from).collect();
        let rows = reader
            .records()
            .map(|r| r.unwrap().iter().map(String::from).collect())
            .collect();
        Csv { header, rows }
    }

    fn col(&self, name: &str) -> usize {
        self.header
            .iter()
            .position(|h| h == name)
            .unwrap_or_else(|| panic!("no column {name}"))
    }

    fn numbers(&self, name: &str) -> Vec<f64> {
        let c = self.col(name);
        self.rows.iter().map(|r| r[c].parse().unwrap()).collect()
    }

    fn cells(&self, name: &str) -> Vec<String> {
        let c = self.col(name);
        self.rows.iter().map(|r| r[c].clone()).collect()
    }
}

fn sweep(args: &[&str]) -> Csv {
    let mut all = vec!["sweep", DEMO];
    all.extend_from_slice(args);
    let out = run(&all);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    Csv::parse(&out.stdout)
}

fn temp(dir: &Path, name: &str) -> PathBuf {
    dir.join(name)
}

#[test]
fn rows_come_in_case_order_with_the_last_input_fastest() {
    let csv = sweep(&[
        "--vary",
        "units.reformer.outlet-temperature=840 degC..860 degC:3",
        "--vary",
        "units.hts.approach.shift=5 K,15 K",
        "--columns",
        "units.reformer.outlet_temperature_K,units.hts.approach_K.shift",
    ]);
    assert_eq!(
        csv.header,
        [
            "units.reformer.outlet-temperature",
            "units.hts.approach.shift",
            "status",
            "warnings",
            "units.reformer.outlet_temperature_K",
            "units.hts.approach_K.shift"
        ]
    );
    assert_eq!(csv.rows.len(), 6);
    // Shown in the units given (degC, K); the results in their own (K).
    let t = csv.numbers("units.reformer.outlet-temperature");
    let a = csv.numbers("units.hts.approach.shift");
    assert_eq!(t, [840.0, 840.0, 850.0, 850.0, 860.0, 860.0]);
    assert_eq!(a, [5.0, 15.0, 5.0, 15.0, 5.0, 15.0]);
    // 0 degC = 273.15 K (ITS-90)
    let t_k = csv.numbers("units.reformer.outlet_temperature_K");
    for (shown, k) in t.iter().zip(&t_k) {
        assert!((shown + 273.15 - k).abs() < 1e-9, "{shown} {k}");
    }
    assert_eq!(csv.numbers("units.hts.approach_K.shift"), a);
    assert!(csv.cells("status").iter().all(|s| s == "ok"));
}

#[test]
fn co_slip_rises_as_the_shift_catalyst_ages() {
    // Common practice: a larger approach to shift equilibrium (an older charge) leaves more CO.
    let csv = sweep(&[
        "--vary",
        "units.lts.approach.shift=0 K..40 K:9",
        "--columns",
        "streams.lts-exit.dry_mol_pct.CO",
    ]);
    let co = csv.numbers("streams.lts-exit.dry_mol_pct.CO");
    assert_eq!(co.len(), 9);
    assert!(co.windows(2).all(|w| w[1] > w[0]), "{co:?}");
}

#[test]
fn methane_slip_falls_with_reformer_temperature_and_with_steam() {
    // Common practice: steam reforming is endothermic and makes moles, so methane slip falls as
    // the outlet temperature rises and as the steam-to-carbon ratio rises.
    let csv = sweep(&[
        "--vary",
        "units.reformer.outlet-temperature=820 degC..920 degC:6",
        "--columns",
        "summary.methane_slip_percent_dry.reformer",
    ]);
    let slip = csv.numbers("summary.methane_slip_percent_dry.reformer");
    assert!(slip.windows(2).all(|w| w[1] < w[0]), "{slip:?}");
    let csv = sweep(&[
        "--vary",
        "feeds.process-steam.total=2600 kmol/h..3800 kmol/h:7",
        "--columns",
        "summary.methane_slip_percent_dry.reformer,summary.steam_to_carbon.prereformer",
    ]);
    let slip = csv.numbers("summary.methane_slip_percent_dry.reformer");
    let ratio = csv.numbers("summary.steam_to_carbon.prereformer");
    assert!(slip.windows(2).all(|w| w[1] < w[0]), "{slip:?}");
    assert!(ratio.windows(2).all(|w| w[1] > w[0]), "{ratio:?}");
}

#[test]
fn a_row_equals_a_solve_of_the_file_edited_by_hand() {
    let dir = tempfile::tempdir().unwrap();
    let edited = std::fs::read_to_string(DEMO)
        .unwrap()
        .replace("approach: {shift: 8 K}", "approach: {shift: 23 K}");
    let path = temp(dir.path(), "edited.yaml");
    std::fs::write(&path, edited).unwrap();
    let out = run(&["solve", path.to_str().unwrap(), "--format", "json"]);
    assert!(out.status.success());
    let solved: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let csv = sweep(&[
        "--vary",
        "units.hts.approach.shift=3 K,23 K",
        "--columns",
        "streams.hts-exit.temperature_K,streams.lts-exit.flow_kmol_h.CO,units.hts.duty_kW",
    ]);
    let pairs = [
        (
            "streams.hts-exit.temperature_K",
            &solved["streams"]["hts-exit"]["temperature_K"],
        ),
        (
            "streams.lts-exit.flow_kmol_h.CO",
            &solved["streams"]["lts-exit"]["flow_kmol_h"]["CO"],
        ),
        ("units.hts.duty_kW", &solved["units"]["hts"]["duty_kW"]),
    ];
    for (column, expected) in pairs {
        let got = csv.numbers(column)[1];
        let want = expected.as_f64().unwrap();
        assert!(
            (got - want).abs() <= 1e-9 * want.abs().max(1.0),
            "{column}: {got} vs {want}"
        );
    }
}

#[test]
fn a_failed_case_is_written_with_its_reason() {
    let dir = tempfile::tempdir().unwrap();
    let out_path = temp(dir.path(), "cases.csv");
    let args = [
        "sweep",
        DEMO,
        "--vary",
        // The process-gas cooler takes gas at the reformer outlet (865 degC): asked for
        // 1000 degC it would have to heat, which a cooler refuses.
        "units.process-gas-cooler.outlet-temperature=340 degC,1000 degC,360 degC",
        "--columns",
        "streams.hts-feed.temperature_K",
        "-o",
        out_path.to_str().unwrap(),
    ];
    let out = run(&args);
    assert!(out.status.success(), "a sweep that ran every case exits 0");
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        stderr.contains("3 of 3 cases") && stderr.contains("1 failed"),
        "{stderr}"
    );
    let csv = Csv::parse(&std::fs::read(&out_path).unwrap());
    let status = csv.cells("status");
    assert_eq!(status[0], "ok");
    assert_eq!(status[2], "ok");
    assert!(status[1].contains("cooler"), "{}", status[1]);
    assert_eq!(csv.cells("streams.hts-feed.temperature_K")[1], "");
    let mut strict = args.to_vec();
    strict.push("--strict");
    assert!(
        !run(&strict).status.success(),
        "--strict fails on a failed case"
    );
}

#[test]
fn threads_and_shards_give_the_same_bytes() {
    let dir = tempfile::tempdir().unwrap();
    let grid = [
        "--vary",
        "units.hts.approach.shift=0 K..30 K:7",
        "--vary",
        "units.reformer.outlet-temperature=830 degC..880 degC:11",
    ];
    let whole = |threads: &str| {
        let mut args = vec!["sweep", DEMO, "--threads", threads];
        args.extend_from_slice(&grid);
        let out = run(&args);
        assert!(out.status.success());
        out.stdout
    };
    let one = whole("1");
    assert_eq!(one, whole("2"));
    assert_eq!(Csv::parse(&one).rows.len(), 77);
    // Three slices of 77 cases start inside blocks; their rows, under one header, are the whole.
    let mut merged: Vec<u8> = Vec::new();
    for k in 1..=3 {
        let part = temp(dir.path(), &format!("part{k}.csv"));
        let shard = format!("{k}/3");
        let mut args = vec![
            "sweep",
            DEMO,
            "--shard",
            &shard,
            "-o",
            part.to_str().unwrap(),
        ];
        args.extend_from_slice(&grid);
        assert!(run(&args).status.success());
        let bytes = std::fs::read(&part).unwrap();
        let body = if k == 1 {
            &bytes[..]
        } else {
            let first_newline = bytes.iter().position(|b| *b == b'\n').unwrap();
            &bytes[first_newline + 1..]
        };
        merged.extend_from_slice(body);
    }
    assert_eq!(merged, one);
}

#[test]
fn seeded_draws_repeat_on_any_thread_count() {
    let draws = |threads: &str, seed: &str| {
        let out = run(&[
            "sweep",
            DEMO,
            "--draws",
            "40",
            "--seed",
            seed,
            "--threads",
            threads,
            "--vary",
            "units.hts.approach.shift~normal(10 K, 3 K)",
            "--vary",
            "units.reformer.outlet-temperature~triangular(850 degC, 865 degC, 870 degC)",
            "--columns",
            "summary.*",
        ]);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        out.stdout
    };
    let a = draws("1", "7");
    assert_eq!(a, draws("2", "7"));
    assert_ne!(a, draws("2", "8"));
    let csv = Csv::parse(&a);
    assert_eq!(csv.rows.len(), 40);
    let t = csv.numbers("units.reformer.outlet-temperature");
    assert!(t.iter().all(|t| (850.0..=870.0).contains(t)), "{t:?}");
    let approach = csv.numbers("units.hts.approach.shift");
    let mean = approach.iter().sum::<f64>() / 40.0;
    // 40 draws of N(10, 3): the mean lies within 4 standard errors (4 * 3 / sqrt 40 = 1.9 K).
    assert!((mean - 10.0).abs() < 1.9, "{mean}");
}

#[test]
fn a_cases_file_gives_the_rows_of_the_same_grid() {
    let dir = tempfile::tempdir().unwrap();
    let cases = temp(dir.path(), "cases.csv");
    std::fs::write(
        &cases,
        "units.reformer.outlet-temperature,feeds.process-steam.total\n\
         850 degC,3000 kmol/h\n\
         1143.15 K,3200 kmol/h\n",
    )
    .unwrap();
    let out = run(&[
        "sweep",
        DEMO,
        "--cases",
        cases.to_str().unwrap(),
        "--columns",
        "summary.*",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let from_file = Csv::parse(&out.stdout);
    // The column is shown in the unit of its first cell: 1143.15 K is 870 degC.
    let t = from_file.numbers("units.reformer.outlet-temperature");
    assert_eq!(t[0], 850.0);
    assert!((t[1] - 870.0).abs() < 1e-9);
    let grid = sweep(&[
        "--vary",
        "units.reformer.outlet-temperature=850 degC,870 degC",
        "--vary",
        "feeds.process-steam.total=3000 kmol/h,3200 kmol/h",
        "--columns",
        "summary.*",
    ]);
    let slip = "summary.methane_slip_percent_dry.reformer";
    let (a, b) = (from_file.numbers(slip), grid.numbers(slip));
    assert!(
        (a[0] - b[0]).abs() < 1e-9 && (a[1] - b[3]).abs() < 1e-9,
        "{a:?} {b:?}"
    );
    // A bad cell is refused with the file, line and column.
    std::fs::write(&cases, "units.hts.approach.shift\n10 K\nten K\n").unwrap();
    let out = run(&["sweep", DEMO, "--cases", cases.to_str().unwrap()]);
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("cases.csv:3:1"), "{err}");
}

#[test]
fn unknown_paths_are_refused_with_the_nearest() {
    let out = run(&[
        "sweep",
        DEMO,
        "--vary",
        "units.hts.aproach.shift=0 K..10 K:3",
    ]);
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("units.hts.approach.shift"), "{err}");
    let out = run(&[
        "sweep",
        DEMO,
        "--vary",
        "units.hts.approach.shift=0 K..10 K:3",
        "--columns",
        "streams.lts-exit.dry_mol_pct.COO",
    ]);
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("streams.lts-exit.dry_mol_pct.CO"), "{err}");
    // A value in the wrong kind of unit.
    let out = run(&[
        "sweep",
        DEMO,
        "--vary",
        "units.hts.approach.shift=0 bar..10 bar:3",
    ]);
    assert!(!out.status.success());
}

#[test]
fn default_columns_cover_streams_units_and_summary() {
    let csv = sweep(&["--vary", "units.hts.approach.shift=5 K,10 K"]);
    for column in [
        "streams.natural-gas.temperature_K",
        "streams.lts-exit.pressure_bar",
        "streams.lts-exit.flow_kmol_h.CO",
        "streams.lts-exit.dry_mol_pct.H2",
        "units.reformer.duty_kW",
        "units.reformer.outlet_temperature_K",
        "units.hts.approach_K.shift",
        "units.reformer.figures.methane-slip-dry",
        "summary.heating_duty_kW",
        "summary.co_slip_percent_dry.lts",
    ] {
        csv.col(column);
    }
    // Species that flow nowhere get no columns; water has no dry fraction.
    assert!(!csv.header.iter().any(|h| h.ends_with(".flow_kmol_h.O2")));
    assert!(!csv.header.iter().any(|h| h.ends_with(".dry_mol_pct.H2O")));
    // Dry mol % of a stream sum to 100.
    let sum: f64 = csv
        .header
        .iter()
        .filter(|h| h.starts_with("streams.lts-exit.dry_mol_pct."))
        .map(|h| csv.numbers(h)[0])
        .sum();
    assert!((sum - 100.0).abs() < 1e-9, "{sum}");
}

#[test]
fn a_chart_and_percentiles_of_the_results() {
    let dir = tempfile::tempdir().unwrap();
    let svg = temp(dir.path(), "co.svg");
    let csv_path = temp(dir.path(), "co.csv");
    let out = run(&[
        "sweep",
        DEMO,
        "--vary",
        "units.lts.approach.shift=0 K..40 K:5",
        "--vary",
        "units.hts.approach.shift=5 K,20 K",
        "-o",
        csv_path.to_str().unwrap(),
        "--plot",
        svg.to_str().unwrap(),
        "--summary",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.starts_with("<svg"));
    assert!(text.contains("units.lts.approach.shift (K)"));
    assert!(text.contains("summary.co_slip_percent_dry.lts (mol % dry)"));
    assert!(text.contains("units.hts.approach.shift = 5 K"));
    assert!(text.contains("units.hts.approach.shift = 20 K"));
    // The median of the ten CO slips, computed here from the CSV, is the P50 printed.
    let csv = Csv::parse(&std::fs::read(&csv_path).unwrap());
    let mut co = csv.numbers("summary.co_slip_percent_dry.lts");
    co.sort_by(f64::total_cmp);
    let median = (co[4] + co[5]) / 2.0;
    let stdout = String::from_utf8_lossy(&out.stdout);
    let line = stdout
        .lines()
        .find(|l| l.contains("summary.co_slip_percent_dry.lts"))
        .unwrap_or_else(|| panic!("{stdout}"));
    let cells: Vec<&str> = line.split_whitespace().collect();
    // result, unit (3 words), count, P10, P50, ...
    let p50: f64 = cells[cells.len() - 5].parse().unwrap();
    assert!((p50 - median).abs() < 1e-4 * median, "{p50} vs {median}");
    assert_eq!(cells[cells.len() - 7], "10");
}

#[test]
fn the_output_may_not_overwrite_the_flowsheet() {
    let dir = tempfile::tempdir().unwrap();
    let copy = temp(dir.path(), "plant.yaml");
    std::fs::copy(DEMO, &copy).unwrap();
    let before = std::fs::read(&copy).unwrap();
    let out = run(&[
        "sweep",
        copy.to_str().unwrap(),
        "--vary",
        "units.hts.approach.shift=5 K,10 K",
        "-o",
        copy.to_str().unwrap(),
    ]);
    assert!(!out.status.success());
    assert_eq!(std::fs::read(&copy).unwrap(), before);
}

#[test]
fn the_steam_to_carbon_ratio_is_set_by_scaling_the_steam_feed() {
    let csv = sweep(&[
        "--vary",
        "units.prereformer.steam-to-carbon=2.4..3.2:5",
        "--columns",
        "summary.steam_to_carbon.prereformer,summary.methane_slip_percent_dry.reformer,\
         streams.process-steam.flow_kmol_h.H2O",
    ]);
    let set = csv.numbers("units.prereformer.steam-to-carbon");
    let met = csv.numbers("summary.steam_to_carbon.prereformer");
    let steam = csv.numbers("streams.process-steam.flow_kmol_h.H2O");
    for ((s, m), w) in set.iter().zip(&met).zip(&steam) {
        // Met to the target tolerance (1e-4); and by hand (common practice definition): steam
        // over hydrocarbon carbon of the feed, 935 + 2 x 35 + 3 x 10 = 1035 kmol/h.
        assert!((s - m).abs() <= 1e-4, "{s} vs {m}");
        assert!((w / 1035.0 - s).abs() <= 1e-4, "{w} kmol/h for {s}");
    }
    // Common practice: more steam per carbon, less methane slip.
    let slip = csv.numbers("summary.methane_slip_percent_dry.reformer");
    assert!(slip.windows(2).all(|w| w[1] < w[0]), "{slip:?}");
}

#[test]
fn an_overlay_and_a_file_with_targets_are_swept_as_they_solve() {
    let flowsheets = concat!(env!("CARGO_MANIFEST_DIR"), "/flowsheets/");
    // The revamp overlay with an added medium-temperature shift: its changes hold in every case.
    let out = run(&[
        "sweep",
        &format!("{flowsheets}revamp-mts.yaml"),
        "--vary",
        "units.mts.approach.shift=5 K,20 K",
        "--columns",
        "summary.co_slip_percent_dry.*,units.hts-exit-cooler.outlet_temperature_K",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let csv = Csv::parse(&out.stdout);
    let mts = csv.numbers("summary.co_slip_percent_dry.mts");
    assert!(mts[1] > mts[0], "{mts:?}");
    // The overlay's change of the HTS exit cooler to 225 degC (498.15 K).
    assert!(csv
        .numbers("units.hts-exit-cooler.outlet_temperature_K")
        .iter()
        .all(|t| (t - 498.15).abs() < 1e-9));
    // The design targets of a file are met in every case.
    let out = run(&[
        "sweep",
        &format!("{flowsheets}targets-demo.yaml"),
        "--vary",
        "units.hts.approach.shift=5 K,20 K",
        "--columns",
        "summary.methane_slip_percent_dry.reformer,streams.lts-exit.dry_mol_pct.CO",
    ]);
    assert!(out.status.success());
    let csv = Csv::parse(&out.stdout);
    for v in csv.numbers("summary.methane_slip_percent_dry.reformer") {
        assert!((v - 4.5).abs() <= 1e-4, "{v}");
    }
    for v in csv.numbers("streams.lts-exit.dry_mol_pct.CO") {
        assert!((v - 0.4).abs() <= 1e-4, "{v}");
    }
}

#[cfg(unix)]
#[test]
fn ctrl_c_leaves_the_rows_finished_and_says_how_many() {
    let dir = tempfile::tempdir().unwrap();
    let out_path = temp(dir.path(), "long.csv");
    let child = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args([
            "sweep",
            DEMO,
            "--vary",
            "units.hts.approach.shift=0 K..40 K:1000",
            "--vary",
            "units.reformer.outlet-temperature=830 degC..880 degC:1000",
            "-o",
            out_path.to_str().unwrap(),
        ])
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    // Wait until rows are being written, then interrupt as Ctrl-C does (SIGINT).
    let started = std::time::Instant::now();
    while std::fs::metadata(&out_path).map_or(0, |m| m.len()) < 100_000 {
        assert!(started.elapsed().as_secs() < 60, "no rows written");
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    let kill = Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(kill.success());
    let out = child.wait_with_output().unwrap();
    assert!(!out.status.success(), "an interrupted sweep exits non-zero");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("interrupted"), "{err}");
    let written: u64 = err
        .split(" of 1000000 cases")
        .next()
        .and_then(|s| s.rsplit(|c: char| !c.is_ascii_digit()).next())
        .and_then(|n| n.parse().ok())
        .unwrap_or_else(|| panic!("{err}"));
    assert!(written > 0 && written < 1_000_000, "{written}");
    // Every row whole: as many rows as said, each as wide as the header.
    let csv = Csv::parse(&std::fs::read(&out_path).unwrap());
    assert_eq!(csv.rows.len() as u64, written);
    assert!(csv.rows.iter().all(|r| r.len() == csv.header.len()));
    assert!(csv.cells("status").iter().all(|s| s == "ok"));
}

#[cfg(target_os = "linux")]
#[test]
fn a_write_error_stops_the_sweep_with_an_error() {
    // /dev/full refuses every write with "no space left on device".
    let out = run(&[
        "sweep",
        DEMO,
        "--vary",
        "units.hts.approach.shift=0 K..40 K:100",
        "-o",
        "/dev/full",
    ]);
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("/dev/full"), "{err}");
}

#[test]
fn no_progress_bar_when_stderr_is_not_a_terminal() {
    let out = run(&[
        "sweep",
        DEMO,
        "--vary",
        "units.hts.approach.shift=0 K..40 K:50",
    ]);
    assert!(out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    // One line: the count of cases, nothing drawn.
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(err.starts_with("50 of 50 cases written"), "{err}");
    assert!(!err.contains('\r') && !err.contains('\u{1b}'), "{err}");
}
