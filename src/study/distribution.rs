//! Distributions of uncertain inputs for Monte Carlo studies, and the seeded draws.
//!
//! `normal(MEAN,SD)`, `uniform(A,B)` and `triangular(A,MODE,B)`, each number with its unit
//! (`normal(10 K, 3 K)`, `uniform(850 degC, 870 degC)`); a standard deviation of an absolute
//! temperature or pressure is a difference ("3 K", "0.5 bar"). Draws are made in the unit of
//! the first number, so the values a study reports are the values drawn.
//!
//! Repeatability: draw `i` of a study takes its numbers from a ChaCha8 generator (Bernstein
//! 2008, the `rand_chacha` crate) seeded with the study's seed on stream `i`, one number set per
//! input in the order given. A draw depends on the seed and its index alone, never on the
//! thread or the slice of the study that makes it. Sampling is that of the `rand_distr` crate
//! (normal: ziggurat method; triangular: inverse transform).

use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use rand_distr::{Distribution as _, Normal, Triangular, Uniform};

use super::vary::StudyInput;
use crate::error::{Error, Result};
use crate::flowsheet::Flowsheet;

/// The shape of a distribution, its parameters in the input's display unit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Shape {
    /// Normal (Gaussian) with a mean and a standard deviation.
    Normal { mean: f64, sd: f64 },
    /// Uniform between two bounds.
    Uniform { low: f64, high: f64 },
    /// Triangular with a lower bound, a mode and an upper bound.
    Triangular { low: f64, mode: f64, high: f64 },
}

/// A distribution of one input.
#[derive(Debug, Clone)]
pub struct Distribution {
    /// Its shape, in the input's display unit.
    pub shape: Shape,
    normal: Normal<f64>,
    uniform: Option<Uniform<f64>>,
    triangular: Option<Triangular<f64>>,
}

impl Distribution {
    /// Read `NAME(ARGS)` for the input `path` of `flowsheet`.
    pub fn parse(flowsheet: &Flowsheet, path: &str, text: &str) -> Result<(StudyInput, Self)> {
        let field = format!("{}~", path.trim());
        let bad = |reason: &str| Error::InvalidValue {
            field: field.clone(),
            value: text.to_string(),
            reason: reason.to_string(),
        };
        let text_t = text.trim();
        let (name, args) = text_t
            .strip_suffix(')')
            .and_then(|t| t.split_once('('))
            .ok_or_else(|| {
                bad(
                    "write normal(MEAN,SD), uniform(A,B) or triangular(A,MODE,B), each number \
                     with its unit, e.g. normal(10 K, 3 K)",
                )
            })?;
        let args: Vec<&str> = args.split(',').map(str::trim).collect();
        let input = StudyInput::resolve(flowsheet, path, args[0])?;
        let absolute = |t: &str| -> Result<f64> {
            let si = input.parse(t)?;
            Ok(input.shown(t, si))
        };
        let want = |n: usize| -> Result<()> {
            if args.len() == n {
                Ok(())
            } else {
                Err(bad(&format!(
                    "{} takes {n} numbers, {} were given",
                    name.trim(),
                    args.len()
                )))
            }
        };
        let shape = match name.trim() {
            "normal" => {
                want(2)?;
                let mean = absolute(args[0])?;
                let sd = match input.difference_kind() {
                    Some(kind) => kind.parse(&field, args[1])? / input.unit.scale,
                    None => args[1]
                        .parse::<f64>()
                        .map_err(|_| bad("the standard deviation must be a number"))?,
                };
                if !(sd > 0.0 && sd.is_finite()) {
                    return Err(bad("the standard deviation must be above 0"));
                }
                Shape::Normal { mean, sd }
            }
            "uniform" => {
                want(2)?;
                let (low, high) = (absolute(args[0])?, absolute(args[1])?);
                if !(low < high) {
                    return Err(bad("the lower bound must be below the upper bound"));
                }
                Shape::Uniform { low, high }
            }
            "triangular" => {
                want(3)?;
                let (low, mode, high) =
                    (absolute(args[0])?, absolute(args[1])?, absolute(args[2])?);
                if !(low < high && low <= mode && mode <= high) {
                    return Err(bad(
                        "write triangular(LOW, MODE, HIGH) with LOW <= MODE <= HIGH and LOW < HIGH",
                    ));
                }
                Shape::Triangular { low, mode, high }
            }
            other => {
                return Err(bad(&format!(
                    "'{other}' is not a distribution here; use normal, uniform or triangular"
                )))
            }
        };
        Ok((input, Distribution::new(shape)?))
    }

    /// A distribution of a given shape (parameters in display units).
    pub fn new(shape: Shape) -> Result<Distribution> {
        let bad = |reason: String| Error::InvalidValue {
            field: "distribution".into(),
            value: format!("{shape:?}"),
            reason,
        };
        let normal = match shape {
            Shape::Normal { mean, sd } => Normal::new(mean, sd).map_err(|e| bad(e.to_string()))?,
            _ => Normal::new(0.0, 1.0).map_err(|e| bad(e.to_string()))?,
        };
        let uniform = match shape {
            Shape::Uniform { low, high } => Some(Uniform::new(low, high)),
            _ => None,
        };
        let triangular = match shape {
            Shape::Triangular { low, mode, high } => {
                Some(Triangular::new(low, high, mode).map_err(|e| bad(e.to_string()))?)
            }
            _ => None,
        };
        Ok(Distribution {
            shape,
            normal,
            uniform,
            triangular,
        })
    }

    /// One draw, in the input's display unit.
    pub fn sample(&self, rng: &mut ChaCha8Rng) -> f64 {
        match (self.shape, &self.uniform, &self.triangular) {
            (Shape::Uniform { .. }, Some(u), _) => u.sample(rng),
            (Shape::Triangular { .. }, _, Some(t)) => t.sample(rng),
            _ => self.normal.sample(rng),
        }
    }
}

/// The generator of draw `index` of a study seeded with `seed`.
pub fn generator(seed: u64, index: u64) -> ChaCha8Rng {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    rng.set_stream(index);
    rng
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Mean and standard deviation of many draws.
    fn moments(d: &Distribution, n: u64) -> (f64, f64) {
        let xs: Vec<f64> = (0..n).map(|i| d.sample(&mut generator(7, i))).collect();
        let mean = xs.iter().sum::<f64>() / n as f64;
        let var = xs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1) as f64;
        (mean, var.sqrt())
    }

    #[test]
    fn draws_have_the_moments_of_their_distribution() {
        // Standard results: uniform(a,b) mean (a+b)/2, sd (b-a)/sqrt(12); triangular(a,c,b)
        // mean (a+b+c)/3, variance (a2+b2+c2-ab-ac-bc)/18 (Evans, Hastings & Peacock,
        // Statistical Distributions). 20 000 draws: tolerances of about 4 standard errors.
        let n = 20_000;
        let (m, s) = moments(
            &Distribution::new(Shape::Normal {
                mean: 10.0,
                sd: 3.0,
            })
            .unwrap(),
            n,
        );
        assert!((m - 10.0).abs() < 4.0 * 3.0 / (n as f64).sqrt(), "{m}");
        assert!((s - 3.0).abs() < 0.06, "{s}");
        let (m, s) = moments(
            &Distribution::new(Shape::Uniform {
                low: 850.0,
                high: 870.0,
            })
            .unwrap(),
            n,
        );
        assert!((m - 860.0).abs() < 0.2, "{m}");
        assert!((s - 20.0 / 12f64.sqrt()).abs() < 0.1, "{s}");
        let (a, c, b) = (0.0f64, 2.0f64, 10.0f64);
        let (m, s) = moments(
            &Distribution::new(Shape::Triangular {
                low: a,
                mode: c,
                high: b,
            })
            .unwrap(),
            n,
        );
        let sd = ((a * a + b * b + c * c - a * b - a * c - b * c) / 18.0).sqrt();
        assert!((m - 4.0).abs() < 4.0 * sd / (n as f64).sqrt(), "{m}");
        assert!((s - sd).abs() < 0.05, "{s} vs {sd}");
    }

    #[test]
    fn a_spread_is_read_in_the_unit_of_the_mean() {
        // 1 bar = 1e5 Pa: a standard deviation of 1 bar about a mean in bar is 1 in draws.
        let db = crate::thermo::SpeciesDb::embedded().unwrap();
        let path =
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/demo-train.yaml");
        let fs = Flowsheet::from_file(&path, &db).unwrap();
        let (input, d) =
            Distribution::parse(&fs, "feeds.natural-gas.pressure", "normal(30 bar, 1.5 bar)")
                .unwrap();
        assert_eq!(input.unit.name, "bar");
        assert_eq!(
            d.shape,
            Shape::Normal {
                mean: 30.0,
                sd: 1.5
            }
        );
        // 5 K about a mean in degC is 5 degC; 9 degF is 5 K (definition of the Fahrenheit degree).
        let (_, d) = Distribution::parse(
            &fs,
            "units.reformer.outlet-temperature",
            "normal(865 degC, 9 degF)",
        )
        .unwrap();
        assert_eq!(
            d.shape,
            Shape::Normal {
                mean: 865.0,
                sd: 5.0
            }
        );
        for bad in [
            "normal(30 bar)",
            "normal(30 bar, -1 bar)",
            "lognormal(30 bar, 1 bar)",
            "uniform(31 bar, 30 bar)",
            "triangular(30 bar, 35 bar, 32 bar)",
            "normal 30 bar",
        ] {
            assert!(
                Distribution::parse(&fs, "feeds.natural-gas.pressure", bad).is_err(),
                "{bad}"
            );
        }
    }

    #[test]
    fn a_draw_depends_on_seed_and_index_only() {
        let d = Distribution::new(Shape::Normal { mean: 0.0, sd: 1.0 }).unwrap();
        let first = d.sample(&mut generator(42, 1000));
        let _ = d.sample(&mut generator(42, 999));
        assert_eq!(first, d.sample(&mut generator(42, 1000)));
        assert_ne!(first, d.sample(&mut generator(43, 1000)));
        assert_ne!(first, d.sample(&mut generator(42, 1001)));
    }
}
