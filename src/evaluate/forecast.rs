//! The trend of an approach temperature over months of samples, and when a chosen result of the
//! flowsheet crosses a limit if the trend goes on. This is an extrapolation: it assumes the
//! catalyst keeps ageing as it did while sampled, at the flowsheet's design rate.
//!
//! - Linear trend: ordinary least squares of approach on time, with the residual standard
//!   deviation, the 95 % confidence band of the line and the 95 % prediction band of a single
//!   sample (Montgomery & Runger, "Applied Statistics and Probability for Engineers", ch. 11:
//!   half-widths t s sqrt(1/n + (t - t_mean)^2 / Sxx) and t s sqrt(1 + 1/n + ...)); the Student
//!   t point by the Cornish-Fisher expansion (Abramowitz & Stegun 26.7.5).
//! - Exponential trend: first-order (size-independent) deactivation, activity a = exp(-k_d t)
//!   (Levenspiel, "Chemical Reaction Engineering", 3rd ed., ch. 21), with the approach taken
//!   inversely proportional to activity (our assumption): approach = A exp(k_d t), fitted by
//!   least squares (Gauss-Newton from the fit of ln approach).
//! - The crossing: the flowsheet solved along the linear trend (each trended approach set by its
//!   input path `units.NAME.approach.REACTION`), scanned a week at a time from the last sample
//!   and then bisected to a tenth of a day; the band is the dates at which the confidence
//!   band's edges make the result cross.

use crate::error::{Error, Result};
use crate::flowsheet::Flowsheet;
use crate::thermo::SpeciesDb;

/// Two-sided 95 % point of the normal distribution.
const Z_975: f64 = 1.959_963_985;

/// The Student t point leaving 2.5 % in the upper tail, `dof` degrees of freedom
/// (Cornish-Fisher expansion, Abramowitz & Stegun 26.7.5, within 0.2 % for dof >= 3; the
/// exact closed forms for 1 and 2 degrees of freedom: tan(0.475 pi), and
/// (2p - 1) / sqrt(2 p (1 - p)) with p = 0.975).
pub fn student_t_975(dof: f64) -> f64 {
    if dof <= 1.0 {
        return (0.475 * std::f64::consts::PI).tan();
    }
    if dof <= 2.0 {
        return 0.95 / (2.0 * 0.975 * 0.025f64).sqrt();
    }
    let z = Z_975;
    let (z3, z5, z7, z9) = (z.powi(3), z.powi(5), z.powi(7), z.powi(9));
    let g1 = (z3 + z) / 4.0;
    let g2 = (5.0 * z5 + 16.0 * z3 + 3.0 * z) / 96.0;
    let g3 = (3.0 * z7 + 19.0 * z5 + 17.0 * z3 - 15.0 * z) / 384.0;
    let g4 = (79.0 * z9 + 776.0 * z7 + 1482.0 * z5 - 1920.0 * z3 - 945.0 * z) / 92_160.0;
    z + g1 / dof + g2 / dof.powi(2) + g3 / dof.powi(3) + g4 / dof.powi(4)
}

/// A straight line fitted by ordinary least squares, time in days from `origin_days`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LinearTrend {
    /// Approach at the origin, K.
    pub intercept_k: f64,
    /// Growth, K per day.
    pub slope_k_per_day: f64,
    /// Residual standard deviation, K (n - 2 degrees of freedom).
    pub residual_sd_k: f64,
    /// Standard error of the slope, K per day.
    pub slope_se_k_per_day: f64,
    /// Samples.
    pub count: usize,
    mean_t: f64,
    sxx: f64,
    t_point: f64,
}

impl LinearTrend {
    /// Fit to (days from the origin, approach K); `None` with fewer than three points or all at
    /// one time.
    pub fn fit(points: &[(f64, f64)]) -> Option<LinearTrend> {
        let n = points.len();
        if n < 3 {
            return None;
        }
        let nf = n as f64;
        let mean_t = points.iter().map(|p| p.0).sum::<f64>() / nf;
        let mean_y = points.iter().map(|p| p.1).sum::<f64>() / nf;
        let sxx: f64 = points.iter().map(|p| (p.0 - mean_t).powi(2)).sum();
        if !(sxx > 0.0) {
            return None;
        }
        let sxy: f64 = points.iter().map(|p| (p.0 - mean_t) * (p.1 - mean_y)).sum();
        let slope = sxy / sxx;
        let intercept = mean_y - slope * mean_t;
        let ss: f64 = points
            .iter()
            .map(|p| (p.1 - intercept - slope * p.0).powi(2))
            .sum();
        let sd = (ss / (nf - 2.0)).sqrt();
        Some(LinearTrend {
            intercept_k: intercept,
            slope_k_per_day: slope,
            residual_sd_k: sd,
            slope_se_k_per_day: sd / sxx.sqrt(),
            count: n,
            mean_t,
            sxx,
            t_point: student_t_975(nf - 2.0),
        })
    }

    /// The line at `t` days, K.
    pub fn at(&self, t: f64) -> f64 {
        self.intercept_k + self.slope_k_per_day * t
    }

    /// Half-width of the 95 % confidence band of the line at `t`, K.
    pub fn confidence_k(&self, t: f64) -> f64 {
        let n = self.count as f64;
        self.t_point * self.residual_sd_k * (1.0 / n + (t - self.mean_t).powi(2) / self.sxx).sqrt()
    }

    /// Half-width of the 95 % prediction band of one sample at `t`, K.
    pub fn prediction_k(&self, t: f64) -> f64 {
        let n = self.count as f64;
        self.t_point
            * self.residual_sd_k
            * (1.0 + 1.0 / n + (t - self.mean_t).powi(2) / self.sxx).sqrt()
    }
}

/// approach = A exp(k t), fitted by least squares (module docs).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ExponentialTrend {
    /// Approach at the origin, K.
    pub initial_k: f64,
    /// Deactivation rate constant k_d, per day.
    pub rate_per_day: f64,
    /// Residual standard deviation, K (n - 2 degrees of freedom).
    pub residual_sd_k: f64,
}

impl ExponentialTrend {
    /// Fit to (days, approach K); `None` with fewer than three points, a non-positive
    /// approach (the form cannot hold it) or no convergence.
    pub fn fit(points: &[(f64, f64)]) -> Option<ExponentialTrend> {
        if points.len() < 3 || points.iter().any(|p| !(p.1 > 0.0)) {
            return None;
        }
        let logs: Vec<(f64, f64)> = points.iter().map(|p| (p.0, p.1.ln())).collect();
        let start = LinearTrend::fit(&logs)?;
        let (mut a, mut k) = (start.intercept_k.exp(), start.slope_k_per_day);
        let ss = |a: f64, k: f64| -> f64 {
            points
                .iter()
                .map(|p| (p.1 - a * (k * p.0).exp()).powi(2))
                .sum()
        };
        for _ in 0..100 {
            // Normal equations of the 2x2 Gauss-Newton step.
            let (mut jtj, mut jtr) = ([[0.0; 2]; 2], [0.0; 2]);
            for p in points {
                let e = (k * p.0).exp();
                let r = p.1 - a * e;
                let j = [e, a * p.0 * e];
                for u in 0..2 {
                    jtr[u] += j[u] * r;
                    for v in 0..2 {
                        jtj[u][v] += j[u] * j[v];
                    }
                }
            }
            let det = jtj[0][0] * jtj[1][1] - jtj[0][1] * jtj[1][0];
            if !(det.abs() > 0.0) {
                break;
            }
            let da = (jtr[0] * jtj[1][1] - jtr[1] * jtj[0][1]) / det;
            let dk = (jtj[0][0] * jtr[1] - jtj[1][0] * jtr[0]) / det;
            let before = ss(a, k);
            let mut t = 1.0;
            while t > 1e-6 && !(ss(a + t * da, k + t * dk) <= before) {
                t *= 0.5;
            }
            a += t * da;
            k += t * dk;
            if (t * dk).abs() < 1e-14 && (t * da).abs() < 1e-12 * a.abs() {
                break;
            }
        }
        let sd = (ss(a, k) / (points.len() as f64 - 2.0)).sqrt();
        (a.is_finite() && k.is_finite()).then_some(ExponentialTrend {
            initial_k: a,
            rate_per_day: k,
            residual_sd_k: sd,
        })
    }

    /// The fit at `t` days, K.
    pub fn at(&self, t: f64) -> f64 {
        self.initial_k * (self.rate_per_day * t).exp()
    }
}

/// The trends of one unit's reaction.
#[derive(Debug, Clone, PartialEq)]
pub struct Trend {
    /// The unit.
    pub unit: String,
    /// The reaction.
    pub reaction: String,
    /// Time origin (the first sample), days since 1970-01-01.
    pub origin_days: f64,
    /// Last sample, days since 1970-01-01.
    pub last_days: f64,
    /// The linear fit.
    pub linear: LinearTrend,
    /// The exponential fit, where it could be made.
    pub exponential: Option<ExponentialTrend>,
}

impl Trend {
    /// Fit both forms to (days since 1970-01-01, approach K); `None` with fewer than three
    /// samples at two times or more.
    pub fn fit(unit: &str, reaction: &str, samples: &[(f64, f64)]) -> Option<Trend> {
        let origin = samples.iter().map(|p| p.0).fold(f64::INFINITY, f64::min);
        let last = samples
            .iter()
            .map(|p| p.0)
            .fold(f64::NEG_INFINITY, f64::max);
        let points: Vec<(f64, f64)> = samples.iter().map(|p| (p.0 - origin, p.1)).collect();
        Some(Trend {
            unit: unit.to_string(),
            reaction: reaction.to_string(),
            origin_days: origin,
            last_days: last,
            linear: LinearTrend::fit(&points)?,
            exponential: ExponentialTrend::fit(&points),
        })
    }

    /// "linear" or "exponential": the form with the smaller residual standard deviation.
    pub fn better(&self) -> &'static str {
        match self.exponential {
            Some(e) if e.residual_sd_k < self.linear.residual_sd_k => "exponential",
            _ => "linear",
        }
    }
}

/// A limit on a result: `PATH>VALUE` or `PATH<VALUE`, the value in the path's unit.
#[derive(Debug, Clone, PartialEq)]
pub struct Limit {
    /// The result path.
    pub path: String,
    /// True for `>`: crossed when the result rises above the value.
    pub above: bool,
    /// The value, in the result path's unit.
    pub value: f64,
}

impl Limit {
    /// Read `streams.lts-exit.dry_mol_pct.CO>0.40`.
    pub fn parse(text: &str) -> Result<Limit> {
        let bad = |reason: &str| Error::InvalidValue {
            field: "--limit".into(),
            value: text.to_string(),
            reason: reason.to_string(),
        };
        let (at, above) = match (text.find('>'), text.find('<')) {
            (Some(i), None) => (i, true),
            (None, Some(i)) => (i, false),
            _ => return Err(bad("write RESULT-PATH>VALUE or RESULT-PATH<VALUE")),
        };
        let path = text[..at].trim();
        let value: f64 = text[at + 1..]
            .trim()
            .parse()
            .map_err(|_| bad("the value after > or < must be a number in the path's unit"))?;
        if path.is_empty() || !value.is_finite() {
            return Err(bad("write RESULT-PATH>VALUE or RESULT-PATH<VALUE"));
        }
        Ok(Limit {
            path: path.to_string(),
            above,
            value,
        })
    }

    fn crossed(&self, v: f64) -> bool {
        if self.above {
            v > self.value
        } else {
            v < self.value
        }
    }
}

/// When the limit is crossed, days since 1970-01-01 (`None`: not within the horizon).
#[derive(Debug, Clone, PartialEq)]
pub struct Crossing {
    /// The limit.
    pub limit: Limit,
    /// Along the trend line.
    pub central_days: Option<f64>,
    /// The earlier of the band edges' crossings.
    pub early_days: Option<f64>,
    /// The later of the band edges' crossings (`None` also when one edge never crosses).
    pub late_days: Option<f64>,
    /// The result at the last sample along the trend line, in the path's unit.
    pub value_at_last: f64,
    /// The scan ran from the last sample to this day, days since 1970-01-01.
    pub horizon_days: f64,
}

/// Solve the flowsheet along the linear trends (each trend's approach set at its value at
/// the day, the band's edge `edge` (-1, 0, +1) times its confidence half-width added) and find
/// when `limit` is crossed, within `horizon` days after the last sample.
pub fn crossing(
    db: &SpeciesDb,
    flowsheet: &Flowsheet,
    trends: &[Trend],
    limit: &Limit,
    horizon: f64,
) -> Result<Crossing> {
    if trends.is_empty() {
        return Err(Error::InvalidValue {
            field: "--limit".into(),
            value: limit.path.clone(),
            reason: "a forecast needs at least three dated samples of one unit".into(),
        });
    }
    let slots = trends
        .iter()
        .map(|t| flowsheet.input(&format!("units.{}.approach.{}", t.unit, t.reaction)))
        .collect::<Result<Vec<_>>>()?;
    let base = flowsheet.parameters();
    let start = trends
        .iter()
        .map(|t| t.last_days)
        .fold(f64::NEG_INFINITY, f64::max);
    let path = flowsheet.solve(db)?.resolve(db, &limit.path)?;
    let value_at = |day: f64, edge: f64| -> Result<f64> {
        let mut params = base.clone();
        for (t, slot) in trends.iter().zip(&slots) {
            let x = day - t.origin_days;
            params[slot.0] = t.linear.at(x) + edge * t.linear.confidence_k(x);
        }
        let r = flowsheet.solve_with(db, &params, None)?;
        path.get(db, &r).ok_or_else(|| Error::InvalidValue {
            field: "--limit".into(),
            value: limit.path.clone(),
            reason: "the result holds no value there".into(),
        })
    };
    let first_crossing = |edge: f64| -> Result<Option<f64>> {
        if limit.crossed(value_at(start, edge)?) {
            return Ok(Some(start));
        }
        let mut lo = start;
        while lo < start + horizon {
            let hi = (lo + 7.0).min(start + horizon);
            if limit.crossed(value_at(hi, edge)?) {
                let (mut a, mut b) = (lo, hi);
                while b - a > 0.1 {
                    let m = 0.5 * (a + b);
                    if limit.crossed(value_at(m, edge)?) {
                        b = m;
                    } else {
                        a = m;
                    }
                }
                return Ok(Some(b));
            }
            lo = hi;
        }
        Ok(None)
    };
    let central = first_crossing(0.0)?;
    let (lower, upper) = (first_crossing(-1.0)?, first_crossing(1.0)?);
    let early = match (lower, upper) {
        (Some(a), Some(b)) => Some(a.min(b)),
        (a, b) => a.or(b),
    };
    let late = match (lower, upper) {
        (Some(a), Some(b)) => Some(a.max(b)),
        _ => None,
    };
    Ok(Crossing {
        limit: limit.clone(),
        central_days: central,
        early_days: early,
        late_days: late,
        value_at_last: value_at(start, 0.0)?,
        horizon_days: start + horizon,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn student_t_points_match_the_tables() {
        // Abramowitz & Stegun (1964), Table 26.10, two-sided 5 % (values from memory): 12.706 (1),
        // 4.303 (2), 3.182 (3), 2.571 (5), 2.228 (10), 2.042 (30), 1.980 (120).
        for (dof, table) in [
            (1.0, 12.706),
            (2.0, 4.303),
            (3.0, 3.182),
            (5.0, 2.571),
            (10.0, 2.228),
            (30.0, 2.042),
            (120.0, 1.980),
        ] {
            let t = student_t_975(dof);
            assert!((t / table - 1.0).abs() < 0.002, "{dof}: {t}");
        }
    }

    #[test]
    fn a_line_and_an_exponential_are_found_again() {
        // Exact data (identities, no outside source needed): 5 + 0.02 t K, and 5 exp(0.002 t).
        let line: Vec<(f64, f64)> = (0..20)
            .map(|i| (i as f64 * 7.0, 5.0 + 0.14 * i as f64))
            .collect();
        let l = LinearTrend::fit(&line).unwrap();
        assert!((l.slope_k_per_day - 0.02).abs() < 1e-12 && (l.intercept_k - 5.0).abs() < 1e-10);
        assert!(l.residual_sd_k < 1e-10);
        let curve: Vec<(f64, f64)> = (0..20)
            .map(|i| (i as f64 * 7.0, 5.0 * (0.014 * i as f64).exp()))
            .collect();
        let e = ExponentialTrend::fit(&curve).unwrap();
        assert!(
            (e.rate_per_day - 0.002).abs() < 1e-9 && (e.initial_k - 5.0).abs() < 1e-7,
            "{e:?}"
        );
        let t = Trend::fit("hts", "shift", &curve).unwrap();
        assert_eq!(t.better(), "exponential");
        // The confidence band is narrowest at the mean time and the prediction band wider.
        let noisy: Vec<(f64, f64)> = line
            .iter()
            .enumerate()
            .map(|(i, p)| (p.0, p.1 + if i % 2 == 0 { 0.3 } else { -0.3 }))
            .collect();
        let n = LinearTrend::fit(&noisy).unwrap();
        assert!(n.confidence_k(66.5) < n.confidence_k(0.0));
        assert!(n.prediction_k(66.5) > n.confidence_k(66.5));
    }

    #[test]
    fn limits_read() {
        let l = Limit::parse("streams.lts-exit.dry_mol_pct.CO>0.40").unwrap();
        assert!(l.above && l.value == 0.4 && l.path == "streams.lts-exit.dry_mol_pct.CO");
        assert!(!Limit::parse("summary.x < 5").unwrap().above);
        for bad in ["x", "a>b", "a>1<2", ">3"] {
            assert!(Limit::parse(bad).is_err(), "{bad}");
        }
    }
}
