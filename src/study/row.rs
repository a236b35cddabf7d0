//! One CSV row of a sweep, built in a reused byte buffer (RFC 4180).
//!
//! Numbers are written with 12 significant digits, trailing zeros dropped ("1093.15",
//! "0.000241", "3"), in exponent form ("1.5e-9") below 1e-5 or from 1e15 in magnitude; a value
//! that is not finite is an empty cell. Numbers never need quoting, so they go straight into
//! the row; text fields (a failed case's reason) go through the `csv` crate's quoting when they
//! hold a comma, a quote or a line break.
//!
//! Hand-written on purpose: writing the rows was 60 % of a sweep's time with the shortest
//! round-trip formatting of the `ryu` crate and the `csv` writer's per-field scan (callgrind,
//! `sweep flowsheets/single-reformer.yaml`, 5000 cases on one thread: 27 000 of 48 300
//! instructions a case). With this writer, the per-column reuse of unchanged values
//! ([`RowWriter::cached_number`]) and one dry total per stream (`flowsheet::paths::Reader`) the
//! whole case costs 31 200 instructions, and the 20 000-case sweep of
//! `tools/bench_sweep_vs_cantera.py` ran in 37 ms instead of 57 ms. Twelve digits keep a
//! relative 5e-13, far below any plant measurement.
//!
//! Later, with the same text for every number: the twelve digits turned into text eight and
//! four at a time in one integer, the powers of ten read from a table, every piece copied with
//! a fixed length (no `memcpy` call), a cached text stored after its comma, and the row
//! buffers reused. Callgrind, instructions a case as the difference of 4000 and 2000 cases:
//! `flowsheets/demo-train.yaml` varying `units.hts.approach.shift` (375 columns) from 275 100
//! to 249 100, the number writer from about 227 instructions a number written (its copy calls
//! included) to about 158; `flowsheets/single-reformer.yaml` with `carbon-path-points: 0` varying
//! the outlet temperature (59 columns) from 33 600 to 29 800.

/// Significant digits of a number in a row.
pub const DIGITS: i32 = 12;

/// Builds the rows of a block in one buffer; a buffer handed over with its rows
/// ([`RowWriter::finish`]) can come back to be filled again ([`RowWriter::begin`]), so a
/// block's rows need no new memory.
#[derive(Debug, Default)]
pub struct RowWriter {
    /// The rows so far.
    bytes: Vec<u8>,
    /// True before the first field of a row.
    at_start: bool,
}

/// The text of one column's last value, reused while the value stays bit-for-bit the same.
#[derive(Debug, Clone, Copy)]
pub struct CachedNumber {
    bits: u64,
    len: u8,
    /// A comma, then the text: a field with or without its separator is one copy of fixed
    /// length from the first or the second byte.
    text: [u8; 33],
}

impl Default for CachedNumber {
    fn default() -> CachedNumber {
        // NaN with a payload no computation makes: never equal to a value met.
        let mut text = [0; 33];
        text[0] = b',';
        CachedNumber {
            bits: 0x7ff8_dead_beef_0001,
            len: 0,
            text,
        }
    }
}

impl CachedNumber {
    /// 32 bytes from the comma (`comma` 1) or from the text (`comma` 0).
    #[inline]
    fn chunk(&self, comma: usize) -> &[u8; 32] {
        let from = usize::from(comma == 0);
        self.text[from..from + 32].try_into().unwrap_or(&[0; 32])
    }

    /// Make the text of `v` unless it is the one held.
    #[inline]
    fn update(&mut self, v: f64) {
        if v.to_bits() != self.bits {
            self.bits = v.to_bits();
            let [_, text @ ..] = &mut self.text;
            self.len = format_number(v, text) as u8;
        }
    }
}

impl RowWriter {
    /// An empty writer.
    pub fn new() -> RowWriter {
        RowWriter {
            bytes: Vec::new(),
            at_start: true,
        }
    }

    /// The rows so far.
    pub fn bytes(&self) -> &[u8] {
        &self.bytes
    }

    /// Start again empty in `room` (a buffer of rows handed over before, cleared, or a new
    /// one), with room for `extra` bytes at least.
    pub fn begin(&mut self, mut room: Vec<u8>, extra: usize) {
        room.clear();
        room.reserve(extra);
        self.bytes = room;
        self.at_start = true;
    }

    /// Hand over the rows so far; the writer is left empty.
    pub fn finish(&mut self) -> Vec<u8> {
        self.at_start = true;
        std::mem::take(&mut self.bytes)
    }

    fn separator(&mut self) {
        if !self.at_start {
            self.bytes.push(b',');
        }
        self.at_start = false;
    }

    /// A number field.
    pub fn number(&mut self, v: f64) {
        let mut cache = CachedNumber::default();
        self.cached_number(v, &mut cache);
    }

    /// A number field, its text taken from `cache` when the value is the one before.
    pub fn cached_number(&mut self, v: f64, cache: &mut CachedNumber) {
        cache.update(v);
        self.field(cache);
    }

    /// One number field per cache, the values taken in turn from `values` (one per cache),
    /// each text reused from its cache while the value stays the same: the same bytes as
    /// [`RowWriter::cached_number`] for each, with the room for all of them made once.
    #[inline]
    pub fn cached_numbers(
        &mut self,
        values: impl Iterator<Item = f64>,
        caches: &mut [CachedNumber],
    ) {
        // Worked on as locals (the vector and whether a comma goes first), so the loop keeps
        // them in registers. At most a comma and 32 bytes of text each.
        let mut bytes = std::mem::take(&mut self.bytes);
        bytes.reserve(caches.len() * 33);
        let mut comma = usize::from(!self.at_start);
        for (v, cache) in values.zip(caches.iter_mut()) {
            cache.update(v);
            let end = bytes.len() + comma + cache.len as usize;
            bytes.extend_from_slice(cache.chunk(comma));
            bytes.truncate(end);
            comma = 1;
        }
        self.bytes = bytes;
        self.at_start = comma == 0;
    }

    /// The cached text as a field: 32 bytes copied (a copy of fixed length) from the comma or
    /// from the text, the end then set after the text.
    #[inline]
    fn field(&mut self, cache: &CachedNumber) {
        let comma = usize::from(!self.at_start);
        self.at_start = false;
        let end = self.bytes.len() + comma + cache.len as usize;
        self.bytes.extend_from_slice(cache.chunk(comma));
        self.bytes.truncate(end);
    }

    /// A text field, quoted as RFC 4180 requires.
    pub fn text(&mut self, s: &str) {
        self.separator();
        if s.bytes().any(|b| matches!(b, b',' | b'"' | b'\n' | b'\r')) {
            let mut w = csv::WriterBuilder::new()
                .terminator(csv::Terminator::Any(b'\n'))
                .from_writer(Vec::new());
            // Writing into memory cannot fail; the record's end closes the quotes, and its
            // terminator is dropped again.
            let _ = w.write_record([s]);
            let mut quoted = w.into_inner().unwrap_or_default();
            quoted.pop();
            self.bytes.extend_from_slice(&quoted);
        } else {
            self.bytes.extend_from_slice(s.as_bytes());
        }
    }

    /// End the row.
    pub fn end(&mut self) {
        self.bytes.push(b'\n');
        self.at_start = true;
    }
}

/// Write `v` into `out` as described in the module documentation; the length written.
///
/// The twelve digits are the value scaled by a power of ten in floating point and rounded half
/// up (so every number keeps the text it always had); they are turned into text eight and four
/// at a time within one integer (SWAR: one lane per digit), and every piece of the text is
/// copied with a fixed length, so no copy of variable length (a `memcpy` call) is made.
#[inline]
pub fn format_number(v: f64, out: &mut [u8; 32]) -> usize {
    if !v.is_finite() {
        return 0;
    }
    if v == 0.0 {
        out[0] = b'0';
        return 1;
    }
    out[0] = b'-';
    let n = usize::from(v < 0.0);
    let (mut exponent, digits) = twelve_digits(v.abs());
    // The digits, padded with '0' so that any 16 bytes from the first 16 are text.
    let mut text = [b'0'; 32];
    let (high, low) = (digits / 10_000, digits % 10_000);
    let (high_lanes, low_lanes) = (digit_lanes8(high as u32), digit_lanes4(low as u32));
    text[..8].copy_from_slice(&(high_lanes | ASCII8).to_le_bytes());
    text[8..12].copy_from_slice(&(low_lanes | ASCII4).to_le_bytes());
    // Significant digits without trailing zeros: the zero lanes at the high end (the first
    // digit is never zero).
    let sig = if low_lanes != 0 {
        12 - (low_lanes.leading_zeros() / 8) as usize
    } else {
        8 - (high_lanes.leading_zeros() / 8) as usize
    };
    let copy16 = |out: &mut [u8; 32], at: usize, from: usize| {
        let chunk: &[u8; 16] = text[from..from + 16].try_into().unwrap_or(&[b'0'; 16]);
        out[at..at + 16].copy_from_slice(chunk);
    };
    if !(-5..15).contains(&exponent) {
        out[n] = text[0];
        let mut at = n + 1;
        if sig > 1 {
            out[at] = b'.';
            copy16(out, at + 1, 1);
            at += sig;
        }
        out[at] = b'e';
        at += 1;
        if exponent < 0 {
            out[at] = b'-';
            at += 1;
            exponent = -exponent;
        }
        let e = exponent as usize;
        if e >= 100 {
            out[at] = b'0' + (e / 100) as u8;
            at += 1;
        }
        let pair = (e % 100) * 2;
        if e >= 10 {
            out[at..at + 2].copy_from_slice(&[PAIRS[pair], PAIRS[pair + 1]]);
            at + 2
        } else {
            out[at] = PAIRS[pair + 1];
            at + 1
        }
    } else if exponent < 0 {
        // "0." and -exponent - 1 zeros (at most four), then the digits.
        out[n..n + 8].copy_from_slice(b"0.000000");
        let at = n + 1 + (-exponent) as usize;
        copy16(out, at, 0);
        at + sig
    } else {
        // Up to fifteen digits before the point: the padding gives the zeros past the twelfth.
        let int_digits = exponent as usize + 1;
        copy16(out, n, 0);
        if sig > int_digits {
            out[n + int_digits] = b'.';
            copy16(out, n + int_digits + 1, int_digits);
            n + sig + 1
        } else {
            n + int_digits
        }
    }
}

/// The decimal exponent of `a` (positive, finite) and its twelve significant digits rounded
/// half up, `10^11 <= digits < 10^12`.
#[inline(always)]
fn twelve_digits(a: f64) -> (i32, u64) {
    // Decimal exponent: floor(e2 log10 2) from the binary exponent (78913 / 2^18 is log10 2 to
    // 6 digits), then one comparison, instead of a logarithm.
    let e2 = ((a.to_bits() >> 52) & 0x7ff) as i32 - 1023;
    let mut exponent = (e2 * 78913) >> 18;
    if e2 > -1022 && a >= pow10_signed(exponent + 1) {
        exponent += 1;
    } else if e2 <= -1022 {
        // Subnormal: the binary exponent says little; count from the value.
        while exponent > -330 && a < pow10_signed(exponent) {
            exponent -= 1;
        }
    }
    // The value scaled to DIGITS digits before the point, rounded half up (a positive value
    // below 2^53, so adding one half rounds once).
    let scale = |e: i32| -> u64 {
        let k = DIGITS - 1 - e;
        let x = if k > 300 {
            // Below about 1e-289: two steps, so the power of ten stays finite.
            a * 1e300 * pow10(k - 300)
        } else if k >= 0 {
            a * pow10(k)
        } else {
            a / pow10(-k)
        };
        // x + 0.5 is below 10^14 here, so the signed conversion (one instruction) truncates
        // as the unsigned one would.
        (x + 0.5) as i64 as u64
    };
    let mut digits = scale(exponent);
    const LIMIT: u64 = 1_000_000_000_000;
    if digits >= LIMIT {
        exponent += 1;
        digits = scale(exponent);
    } else if digits < LIMIT / 10 {
        exponent -= 1;
        digits = scale(exponent);
    }
    if digits >= LIMIT {
        // Rounding carried into a thirteenth digit (9.9999999999996 -> 10).
        digits /= 10;
        exponent += 1;
    }
    (exponent, digits)
}

/// '0' in every byte lane.
const ASCII8: u64 = 0x3030_3030_3030_3030;
const ASCII4: u32 = 0x3030_3030;

/// The eight decimal digits of `x < 10^8`, one a byte, the first in the lowest byte.
#[inline]
fn digit_lanes8(x: u32) -> u64 {
    // Two lanes of 32 bits: the first four digits low, the last four high.
    let v = u64::from(x / 10_000) | (u64::from(x % 10_000) << 32);
    // Each lane below 10^4 into two 16-bit lanes below 100: q = v / 100 by 5243 / 2^19 (exact
    // below 43 699), the remainder beside it.
    let q = ((v * 5243) >> 19) & 0x0000_007f_0000_007f;
    let v = q | ((v - q * 100) << 16);
    // Each 16-bit lane below 100 into two byte lanes: t = v / 10 by 103 / 2^10 (exact below
    // 179), the units beside it.
    let t = ((v * 103) >> 10) & 0x000f_000f_000f_000f;
    t | ((v - t * 10) << 8)
}

/// The four decimal digits of `x < 10^4`, one a byte, the first in the lowest byte.
#[inline]
fn digit_lanes4(x: u32) -> u32 {
    let q = (x * 5243) >> 19;
    let v = q | ((x - q * 100) << 16);
    let t = ((v * 103) >> 10) & 0x000f_000f;
    t | ((v - t * 10) << 8)
}

/// "00" to "99".
const PAIRS: &[u8; 200] = b"0001020304050607080910111213141516171819\
2021222324252627282930313233343536373839\
4041424344454647484950515253545556575859\
6061626364656667686970717273747576777879\
8081828384858687888990919293949596979899";

/// 10^k for 0 <= k <= 22 exactly, beyond by repeated multiplication (10^22 times 10^(k-22)),
/// read from a table made at compile time by those same multiplications.
#[inline]
fn pow10(k: i32) -> f64 {
    match POW10.get(k as usize) {
        Some(p) => *p,
        None => pow10_multiplied(k),
    }
}

/// 10^0 to 10^309 as [`pow10`] gives them.
static POW10: [f64; 310] = {
    let mut table = [0.0; 310];
    let mut k = 0;
    while k < 310 {
        table[k] = if k <= 22 {
            EXACT_POW10[k]
        } else {
            EXACT_POW10[22] * table[k - 22]
        };
        k += 1;
    }
    table
};

/// 1 / 10^k for 0 <= k <= 300, each the quotient of 1 by [`pow10`]`(k)`, made at compile time.
static INVERSE_POW10: [f64; 301] = {
    let mut table = [0.0; 301];
    let mut k = 0;
    while k < 301 {
        table[k] = 1.0 / POW10[k];
        k += 1;
    }
    table
};

/// The powers of ten a double holds exactly.
const EXACT_POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// 10^k by repeated multiplication (beyond the table: infinite).
#[cold]
fn pow10_multiplied(k: i32) -> f64 {
    if k <= 22 {
        EXACT_POW10[k as usize]
    } else {
        EXACT_POW10[22] * pow10_multiplied(k - 22)
    }
}

/// 10^k for any k (a comparison value; exact for |k| <= 22).
#[inline]
fn pow10_signed(k: i32) -> f64 {
    if k >= 0 {
        pow10(k.min(309))
    } else if k >= -300 {
        INVERSE_POW10[(-k) as usize]
    } else {
        1e-300 / pow10(-k - 300)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// The writer as it was before the digits were made eight at a time, kept as the reference
    /// every output is compared with.
    fn reference_format(v: f64, out: &mut [u8; 32]) -> usize {
        if !v.is_finite() {
            return 0;
        }
        if v == 0.0 {
            out[0] = b'0';
            return 1;
        }
        let mut n = 0;
        if v < 0.0 {
            out[0] = b'-';
            n = 1;
        }
        let a = v.abs();
        // Decimal exponent: floor(e2 log10 2) from the binary exponent (78913 / 2^18 is log10 2 to
        // 6 digits), then one comparison, instead of a logarithm.
        let e2 = ((a.to_bits() >> 52) & 0x7ff) as i32 - 1023;
        let mut exponent = (e2 * 78913) >> 18;
        if e2 > -1022 && a >= reference_pow10_signed(exponent + 1) {
            exponent += 1;
        } else if e2 <= -1022 {
            // Subnormal: the binary exponent says little; count from the value.
            while exponent > -330 && a < reference_pow10_signed(exponent) {
                exponent -= 1;
            }
        }
        // The value scaled to DIGITS digits before the point, rounded half up (a positive value
        // below 2^53, so adding one half rounds once).
        let scale = |e: i32| -> u64 {
            let k = DIGITS - 1 - e;
            let x = if k > 300 {
                // Below about 1e-289: two steps, so the power of ten stays finite.
                a * 1e300 * reference_pow10(k - 300)
            } else if k >= 0 {
                a * reference_pow10(k)
            } else {
                a / reference_pow10(-k)
            };
            (x + 0.5) as u64
        };
        let mut digits = scale(exponent);
        const LIMIT: u64 = 1_000_000_000_000;
        if digits >= LIMIT {
            exponent += 1;
            digits = scale(exponent);
        } else if digits < LIMIT / 10 {
            exponent -= 1;
            digits = scale(exponent);
        }
        if digits >= LIMIT {
            // Rounding carried into a thirteenth digit (9.9999999999996 -> 10).
            digits /= 10;
            exponent += 1;
        }
        // The twelve digits, two at a time.
        let mut text = [0u8; DIGITS as usize];
        let mut d = digits;
        let mut at = DIGITS as usize;
        while at > 0 {
            let pair = (d % 100) as usize * 2;
            d /= 100;
            text[at - 2..at].copy_from_slice(&PAIRS[pair..pair + 2]);
            at -= 2;
        }
        let len = DIGITS as usize;
        // Significant digits without trailing zeros.
        let mut sig = len;
        while sig > 1 && text[sig - 1] == b'0' {
            sig -= 1;
        }
        let mut put = |bytes: &[u8], n: &mut usize| {
            out[*n..*n + bytes.len()].copy_from_slice(bytes);
            *n += bytes.len();
        };
        if !(-5..15).contains(&exponent) {
            put(&text[..1], &mut n);
            if sig > 1 {
                put(b".", &mut n);
                put(&text[1..sig], &mut n);
            }
            put(b"e", &mut n);
            if exponent < 0 {
                put(b"-", &mut n);
            }
            let e = exponent.unsigned_abs() as usize;
            if e >= 100 {
                put(&[b'0' + (e / 100) as u8], &mut n);
            }
            if e >= 10 {
                put(&PAIRS[(e % 100) * 2..(e % 100) * 2 + 2], &mut n);
            } else {
                put(&[b'0' + e as u8], &mut n);
            }
        } else if exponent < 0 {
            put(b"0.", &mut n);
            for _ in 0..(-exponent - 1) {
                put(b"0", &mut n);
            }
            put(&text[..sig], &mut n);
        } else {
            let int_digits = exponent as usize + 1;
            if int_digits <= len {
                put(&text[..int_digits], &mut n);
            } else {
                put(&text, &mut n);
                for _ in len..int_digits {
                    put(b"0", &mut n);
                }
            }
            if sig > int_digits {
                put(b".", &mut n);
                put(&text[int_digits..sig], &mut n);
            }
        }
        n
    }

    /// 10^k as the reference writer made it: exact to 10^22, beyond by recursion.
    fn reference_pow10(k: i32) -> f64 {
        const EXACT: [f64; 23] = [
            1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
            1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
        ];
        if k <= 22 {
            EXACT[k as usize]
        } else {
            EXACT[22] * reference_pow10(k - 22)
        }
    }

    fn reference_pow10_signed(k: i32) -> f64 {
        if k >= 0 {
            reference_pow10(k.min(309))
        } else if k >= -300 {
            1.0 / reference_pow10(-k)
        } else {
            1e-300 / reference_pow10(-k - 300)
        }
    }

    #[test]
    fn the_table_holds_the_powers_the_multiplications_give() {
        for k in 0..=340 {
            assert_eq!(pow10(k).to_bits(), reference_pow10(k).to_bits(), "10^{k}");
            assert_eq!(
                pow10_signed(-k).to_bits(),
                reference_pow10_signed(-k).to_bits(),
                "10^-{k}"
            );
        }
    }

    fn text(v: f64) -> String {
        let mut buf = [0u8; 32];
        let n = format_number(v, &mut buf);
        String::from_utf8(buf[..n].to_vec()).unwrap()
    }

    #[test]
    fn numbers_as_a_person_reads_them() {
        assert_eq!(text(1093.15), "1093.15");
        assert_eq!(text(820.0 + 273.15), "1093.15");
        assert_eq!(text(3.0), "3");
        assert_eq!(text(-66879.56508120164), "-66879.5650812");
        assert_eq!(text(0.24017846550212887), "0.240178465502");
        assert_eq!(text(0.000241), "0.000241");
        assert_eq!(text(1.5e-9), "1.5e-9");
        assert_eq!(text(2.5e15), "2.5e15");
        assert_eq!(text(123456789012345.0), "123456789012000");
        assert_eq!(text(0.0), "0");
        assert_eq!(text(-0.0), "0");
        assert_eq!(text(f64::NAN), "");
        assert_eq!(text(f64::INFINITY), "");
        // Rounding that carries into a new digit.
        assert_eq!(text(9.9999999999996), "10");
        assert_eq!(text(0.99999999999996), "1");
        assert_eq!(text(1e-5), "0.00001");
        assert_eq!(text(9.99999999999e-6), "9.99999999999e-6");
        assert_eq!(text(f64::MAX), "1.79769313486e308");
        assert_eq!(text(f64::MIN_POSITIVE), "2.22507385851e-308");
        // Subnormal numbers, and powers of ten at the edges of the plain form.
        assert_eq!(text(5e-324), "4.94065645841e-324");
        assert_eq!(text(1e-310), "1e-310");
        assert_eq!(text(1e15), "1e15");
        assert_eq!(text(999999999999999.0), "1e15");
        assert_eq!(text(1e14), "100000000000000");
        assert_eq!(text(0.1), "0.1");
        assert_eq!(text(100.0), "100");
    }

    proptest! {
        /// Read back, a number is within half a unit of its twelfth digit (5e-12 relative,
        /// with the scaling's one rounding) of the value: compared with Rust's own exact
        /// formatting of the same value.
        #[test]
        fn numbers_read_back_to_twelve_digits(
            v in prop::num::f64::NORMAL | prop::num::f64::SUBNORMAL
        ) {
            let written = text(v);
            let back: f64 = written.parse().unwrap();
            // Subnormals keep fewer bits: there the last place of the value is the limit.
            let allowed = (5.1e-12 * v.abs()).max(5e-324);
            prop_assert!((back - v).abs() <= allowed, "{v} -> {written}");
            prop_assert!(written.len() <= 32);
        }
    }

    fn same_as_reference(v: f64) {
        let (mut new, mut old) = ([0u8; 32], [0u8; 32]);
        let n = format_number(v, &mut new);
        let m = reference_format(v, &mut old);
        assert_eq!(
            &new[..n],
            &old[..m],
            "{v:e} ({:#x}): {} against {}",
            v.to_bits(),
            String::from_utf8_lossy(&new[..n]),
            String::from_utf8_lossy(&old[..m])
        );
    }

    proptest! {
        /// Any bit pattern (NaN, infinities, subnormals included) gives the text the reference
        /// writer gives.
        #[test]
        fn any_value_as_the_reference_writes_it(bits in any::<u64>()) {
            let v = f64::from_bits(bits);
            let (mut new, mut old) = ([0u8; 32], [0u8; 32]);
            let n = format_number(v, &mut new);
            let m = reference_format(v, &mut old);
            prop_assert_eq!(&new[..n], &old[..m], "{:e}", v);
        }
    }

    /// The text is unchanged where it is most likely to break: random bit patterns, whole
    /// numbers, short decimals, every power of ten and the values beside it, and the values
    /// just around each rounding boundary of the twelfth digit.
    #[test]
    fn texts_as_the_reference_writes_them() {
        // xorshift64* (Vigna 2016), a fixed seed.
        let mut state = 0x9e37_79b9_7f4a_7c15u64;
        let mut next = || {
            state ^= state >> 12;
            state ^= state << 25;
            state ^= state >> 27;
            state.wrapping_mul(0x2545_f491_4f6c_dd1d)
        };
        for _ in 0..300_000 {
            same_as_reference(f64::from_bits(next()));
            // Plant-sized magnitudes: 1e-7 to 1e9 with a random mantissa.
            let r = next();
            let v = (r >> 11) as f64 / (1u64 << 53) as f64 * 10f64.powi((r % 17) as i32 - 7);
            same_as_reference(v);
            same_as_reference(-v);
        }
        for i in 0..100_000 {
            same_as_reference(i as f64);
            for scale in [0.1, 0.01, 0.001, 1e-6, 1e6, 1e12] {
                same_as_reference(i as f64 * scale);
            }
        }
        for e in -330..=310 {
            let p = 10f64.powi(e);
            let mut v = p;
            let mut w = p;
            for _ in 0..8 {
                same_as_reference(v);
                same_as_reference(w);
                v = f64::from_bits(v.to_bits() + 1);
                w = f64::from_bits(w.to_bits().saturating_sub(1));
            }
            // About 0.5 units of the twelfth digit, the 12 digits all nines, and 1.5.
            for m in [
                9.999_999_999_995,
                9.999_999_999_994_9,
                1.000_000_000_005,
                1.5,
            ] {
                let c = m * p;
                let mut v = c;
                let mut w = c;
                for _ in 0..8 {
                    same_as_reference(v);
                    same_as_reference(w);
                    v = f64::from_bits(v.to_bits() + 1);
                    w = f64::from_bits(w.to_bits().saturating_sub(1));
                }
            }
        }
    }

    #[test]
    fn text_fields_are_quoted_only_when_needed() {
        let mut w = RowWriter::new();
        w.text("ok");
        w.number(1.5);
        w.text("a, \"b\"");
        w.end();
        w.number(2.0);
        w.end();
        assert_eq!(
            String::from_utf8(w.bytes().to_vec()).unwrap(),
            "ok,1.5,\"a, \"\"b\"\"\"\n2\n"
        );
    }

    #[test]
    fn many_cached_numbers_as_one_at_a_time() {
        let rows: [&[f64]; 4] = [
            &[1.25, 0.0, -3.5e-9, f64::NAN],
            &[1.25, 2.0, -3.5e-9, 1e300],
            &[f64::NAN, 2.0, 123456789.0, 1e300],
            &[f64::NAN, f64::NAN, f64::NAN, f64::NAN],
        ];
        for leading_field in [false, true] {
            let (mut one, mut many) = (RowWriter::new(), RowWriter::new());
            let mut one_cache = [CachedNumber::default(); 4];
            let mut many_cache = [CachedNumber::default(); 4];
            for values in rows {
                if leading_field {
                    one.text("ok");
                    many.text("ok");
                }
                for (v, c) in values.iter().zip(one_cache.iter_mut()) {
                    one.cached_number(*v, c);
                }
                many.cached_numbers(values.iter().copied(), &mut many_cache);
                one.end();
                many.end();
            }
            assert_eq!(
                String::from_utf8(many.bytes().to_vec()).unwrap(),
                String::from_utf8(one.bytes().to_vec()).unwrap()
            );
        }
        let mut w = RowWriter::new();
        w.cached_numbers([0.5, 2.0].into_iter(), &mut [CachedNumber::default(); 2]);
        w.end();
        assert_eq!(String::from_utf8(w.bytes().to_vec()).unwrap(), "0.5,2\n");
    }

    #[test]
    fn a_cached_number_is_rewritten_when_it_changes() {
        let mut w = RowWriter::new();
        let mut cache = CachedNumber::default();
        for v in [1.25, 1.25, 2.5, f64::NAN, 2.5] {
            w.cached_number(v, &mut cache);
            w.end();
        }
        assert_eq!(
            String::from_utf8(w.bytes().to_vec()).unwrap(),
            "1.25\n1.25\n2.5\n\n2.5\n"
        );
    }
}
