//! The rows of a streamed χ²: where they come from ([`Source`]: the used points with their
//! ln(T/θ), formed and reflected a block of [`LANES`] at a time), the reflections
//! as nalgebra makes them ([`Reflection`]) and its dot products' order of summation
//! ([`Lanes`]).

// Slots of a row are clearest indexed.
#![allow(clippy::needless_range_loop)]

use super::{F, MAX_STREAMED_COLUMNS, SLOTS};
use crate::measurement::Measurement;
use crate::model::Model;
use std::borrow::Cow;
use std::ops::Range;

/// One of nalgebra's dot products (`Matrix::dotx` on a dynamic column), fed a term at a
/// time in row order: eight partial sums over the leading multiple of eight rows, combined
/// as (0 + 4), (1 + 5), (2 + 6), (3 + 7) into a sum from zero, then the rest added in order.
pub(super) struct Lanes {
    acc: [f64; SUMS],
    full: usize,
    res: f64,
    combined: bool,
}

impl Lanes {
    /// A sum over a view of `len` rows.
    pub(super) fn new(len: usize) -> Lanes {
        Lanes {
            acc: [0.0; SUMS],
            full: len / SUMS * SUMS,
            res: 0.0,
            combined: false,
        }
    }

    /// Adds the term of the view's row `rel`; rows come in order.
    #[inline(always)]
    pub(super) fn push(&mut self, rel: usize, v: f64) {
        if rel < self.full {
            self.acc[rel % SUMS] += v;
        } else {
            if !self.combined {
                self.combine();
            }
            self.res += v;
        }
    }

    /// Adds the terms of a block of `m` rows from the view's row `rel` (a multiple of
    /// [`LANES`]): a whole block inside the leading multiple of eight adds lane by lane to
    /// its partial sums, which is the same as adding its rows in turn.
    #[inline(always)]
    pub(super) fn push_block(&mut self, rel: usize, m: usize, v: &[f64; LANES]) {
        if m == LANES && rel + LANES <= self.full {
            let first = rel % SUMS;
            for (a, x) in self.acc[first..first + LANES].iter_mut().zip(v) {
                *a += x;
            }
        } else {
            for (d, &x) in v[..m].iter().enumerate() {
                self.push(rel + d, x);
            }
        }
    }

    /// The eight partial sums of the whole blocks, taken elsewhere in the same order.
    pub(super) fn set_lanes(&mut self, acc: [f64; SUMS]) {
        self.acc = acc;
    }

    pub(super) fn combine(&mut self) {
        let a = self.acc;
        let mut res = 0.0;
        res += a[0] + a[4];
        res += a[1] + a[5];
        res += a[2] + a[6];
        res += a[3] + a[7];
        self.res = res;
        self.combined = true;
    }

    pub(super) fn total(mut self) -> f64 {
        if !self.combined {
            self.combine();
        }
        self.res
    }
}

/// The partial sums of nalgebra's dot products ([`Lanes`]).
const SUMS: usize = 8;

/// Rows formed and reflected together: a block of four rows of a view (starting at a
/// multiple of four from the view's first row) adds one term to each of four of `Lanes`'
/// eight partial sums, so a block is reduced lane by lane and the loops over it vectorise;
/// two blocks make one group of eight, whose halves two threads can take
/// ([`Source::lane_sums`]). Each lane's arithmetic is the row's own, so a row's numbers do
/// not depend on its block.
pub(super) const LANES: usize = 4;

/// Whole groups of eight rows from which [`Source::lane_sums`] shares a pass with a second
/// thread (about 0.3 ms of work a thread; the thread costs some tens of microseconds).
const SPLIT_GROUPS: usize = 4096;

/// A block of rows, slot by slot: `b[j][lane]`.
pub(super) type Block = [[f64; LANES]; SLOTS];

/// One Householder reflection as nalgebra makes it (`reflection_axis_mut`,
/// `Reflection::reflect_with_sign`).
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct Reflection {
    /// Added to the first entry of the column before it is scaled into the axis.
    pub(super) signed_norm: f64,
    /// The axis is (entry / `sf`) / `nrm`.
    pub(super) sf: f64,
    pub(super) nrm: f64,
    /// The sign the reflected entries are multiplied by.
    pub(super) sign: f64,
    /// For each later slot j: entry ← factor[j]·axis + sign·entry.
    pub(super) factor: [f64; SLOTS],
}

impl Reflection {
    /// Applies reflection `k` to a block's slots k + 1 .. `upto` and, `with_f`, to f; with
    /// `first`, lane 0 is the view's first row (row k).
    #[inline(always)]
    pub(super) fn apply(&self, k: usize, upto: usize, with_f: bool, v: &mut Block, first: bool) {
        let mut x = v[k];
        if first {
            x[0] += self.signed_norm;
        }
        let mut axis = [0.0; LANES];
        for (a, x) in axis.iter_mut().zip(&x) {
            *a = x / self.sf / self.nrm;
        }
        let one = |j: usize, v: &mut [f64; LANES]| {
            let (factor, sign) = (self.factor[j], self.sign);
            for (e, a) in v.iter_mut().zip(&axis) {
                *e = factor * a * 1.0 + sign * *e;
            }
        };
        for j in k + 1..upto {
            one(j, &mut v[j]);
        }
        if with_f {
            one(F, &mut v[F]);
        }
    }
}

/// Which row formula a [`Source`] calls: the shipped models' inlined (so a block's rows
/// vectorise), any other model's through its [`Model`] handle.
#[derive(Clone, Copy)]
pub(super) enum Formula {
    ClarkeGlew,
    Other,
}

/// Where the rows come from: the included points, their ln(T/θ), the weighting and the
/// column scale.
pub(super) struct Source<'a> {
    pub(super) points: &'a [Measurement],
    /// ln(T/θ) of each used point (the caller's when it has them and every point is used).
    pub(super) logs: Cow<'a, [f64]>,
    pub(super) model: Model,
    pub(super) formula: Formula,
    pub(super) theta: f64,
    pub(super) weighted: bool,
    pub(super) p: usize,
    pub(super) inv_scale: [f64; MAX_STREAMED_COLUMNS],
}

/// The used points' T, ln(T/θ), σ(ln K) (NaN for none) and ln K of one block; unused
/// lanes hold harmless numbers.
pub(super) struct Inputs {
    pub(super) t: [f64; LANES],
    pub(super) l: [f64; LANES],
    pub(super) s: [f64; LANES],
    pub(super) y: [f64; LANES],
}

impl Inputs {
    /// Sets lane `i` from a used point and its ln(T/θ).
    #[inline(always)]
    fn set(&mut self, i: usize, pt: &Measurement, l: f64) {
        self.t[i] = pt.t_k;
        self.l[i] = l;
        self.s[i] = pt.sigma_ln_k.unwrap_or(f64::NAN);
        self.y[i] = pt.ln_k;
    }
}

impl Default for Inputs {
    fn default() -> Self {
        Inputs {
            t: [1.0; LANES],
            l: [0.0; LANES],
            s: [1.0; LANES],
            y: [0.0; LANES],
        }
    }
}

impl Source<'_> {
    /// The weighted, column-equilibrated rows and √w·y of a block, as `Scaled::row_into`
    /// forms them (lane by lane, so each row's numbers are its own), in the slots before
    /// `need` only (the others keep what they held): a pass that reads the leading columns
    /// does none of the divisions of the later ones.
    #[inline(always)]
    pub(super) fn scaled(&self, inp: &Inputs, v: &mut Block, need: usize) {
        match need {
            1 => self.scaled_n::<1>(inp, v),
            2 => self.scaled_n::<2>(inp, v),
            3 => self.scaled_n::<3>(inp, v),
            4 => self.scaled_n::<4>(inp, v),
            _ => self.scaled_n::<SLOTS>(inp, v),
        }
    }

    /// [`Source::scaled`] of the slots before `N`.
    #[inline(always)]
    pub(super) fn scaled_n<const N: usize>(&self, inp: &Inputs, v: &mut Block) {
        let mut raw = [[0.0; LANES]; MAX_STREAMED_COLUMNS];
        match self.formula {
            Formula::ClarkeGlew => {
                for i in 0..LANES {
                    let r = crate::models::clarke_glew::row(inp.t[i], self.theta, inp.l[i]);
                    for j in 0..MAX_STREAMED_COLUMNS {
                        raw[j][i] = r[j];
                    }
                }
            }
            Formula::Other => {
                for i in 0..LANES {
                    let mut r = [0.0; MAX_STREAMED_COLUMNS];
                    self.model
                        .row_with_log_into(inp.t[i], self.theta, inp.l[i], &mut r[..self.p]);
                    for j in 0..MAX_STREAMED_COLUMNS {
                        raw[j][i] = r[j];
                    }
                }
            }
        }
        // √w from σ again in every pass (a division and a root a lane, in a loop that
        // vectorises): cheaper than reading it from memory beside the points.
        let mut sw = [1.0; LANES];
        if self.weighted {
            for (w, &s) in sw.iter_mut().zip(&inp.s) {
                *w = sqrt_weight(s);
            }
        }
        for j in 0..self.p.min(N) {
            let inv = self.inv_scale[j];
            for i in 0..LANES {
                v[j][i] = raw[j][i] * sw[i] * inv;
            }
        }
        if self.p < N {
            for i in 0..LANES {
                v[self.p][i] = inp.y[i] * sw[i];
            }
        }
    }

    /// A block of rows below every reflection in `refl` (none of them its first row), as a
    /// pass sees it: the slots before `need` formed, f written by `init` in `lanes`, the
    /// reflections applied to the slots before `upto` (and f, `with_f`).
    #[inline(always)]
    #[allow(clippy::too_many_arguments)]
    fn reflected(
        &self,
        inp: &Inputs,
        need: usize,
        row: usize,
        lanes: Range<usize>,
        refl: &[Reflection],
        upto: usize,
        with_f: bool,
        init: &impl Fn(usize, Range<usize>, &mut Block),
        v: &mut Block,
    ) {
        self.scaled(inp, v, need);
        init(row, lanes, v);
        for (k, r) in refl.iter().enumerate() {
            r.apply(k, upto, with_f, v, false);
        }
    }

    /// The slots a pass forms: those the reflections reach (the passes of the factorisation
    /// read no later one); every column and √w·y for the passes without reflections and for
    /// those with f (whose `init` forms f from the row's original slots).
    #[inline(always)]
    fn slots_formed(p: usize, upto: usize, with_f: bool) -> usize {
        if upto == 0 || with_f {
            p + 1
        } else {
            upto
        }
    }

    /// [`Source::rows`] over every used row with no reflection applied and no f, a block at
    /// a time in order: `f(row, m, block)` for the block of `m` rows from used row `row`.
    pub(super) fn original_rows(&self, mut f: impl FnMut(usize, usize, &Block)) {
        self.rows(0, &[], 0, false, |_, _, _| (), |_, row, m, v| f(row, m, v));
    }

    /// `S` sums over the rows from `from` on, taken as [`Lanes`] takes them: for each block
    /// of rows (as [`Source::rows`] forms and reflects them), `terms(rel, lanes, block, t)`
    /// writes each sum's term of every row in `lanes` (the block's rows) into `t` and says
    /// whether they are good (finite, say). When every point is used and the view is large,
    /// each group of eight rows is shared between this thread and a second one (this one
    /// forms the first block of four, the other the second): each of the eight partial sums
    /// gets the same terms in the same order, so the sums are the same bits; the rows after
    /// the last whole group are added in order afterwards.
    #[allow(clippy::too_many_arguments)]
    pub(super) fn lane_sums<const S: usize>(
        &self,
        from: usize,
        refl: &[Reflection],
        upto: usize,
        with_f: bool,
        init: impl Fn(usize, Range<usize>, &mut Block) + Sync,
        terms: impl Fn(usize, Range<usize>, &Block, &mut [[f64; LANES]; S]) -> bool + Sync,
    ) -> Option<[Lanes; S]> {
        let n = self.logs.len();
        let len = n.saturating_sub(from);
        let mut out: [Lanes; S] = std::array::from_fn(|_| Lanes::new(len));
        let whole = len / SUMS;
        let mut good = true;
        let mut tail_from = from;
        if n == self.points.len() && whole >= SPLIT_GROUPS {
            let need = Self::slots_formed(self.p, upto, with_f);
            // The partial sums of one half of every whole group (`first`: 0 or 4).
            let half = |first: usize| {
                let mut acc = [[0.0f64; LANES]; S];
                let mut ok = true;
                let mut v: Block = [[0.0; LANES]; SLOTS];
                let mut t = [[0.0f64; LANES]; S];
                for g in 0..whole {
                    let rel = g * SUMS + first;
                    let row = from + rel;
                    let mut inp = Inputs::default();
                    for (i, (pt, &l)) in self.points[row..row + LANES]
                        .iter()
                        .zip(&self.logs[row..row + LANES])
                        .enumerate()
                    {
                        inp.set(i, pt, l);
                    }
                    self.reflected(&inp, need, row, 0..LANES, refl, upto, with_f, &init, &mut v);
                    ok &= terms(rel, 0..LANES, &v, &mut t);
                    for (a, t) in acc.iter_mut().zip(&t) {
                        for (a, t) in a.iter_mut().zip(t) {
                            *a += t;
                        }
                    }
                }
                (acc, ok)
            };
            let ((low, ok_low), (high, ok_high)) = std::thread::scope(|scope| {
                let other = std::thread::Builder::new()
                    .name("isochore-lanes".into())
                    .spawn_scoped(scope, || half(LANES));
                let low = half(0);
                let high = match other {
                    Ok(h) => h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)),
                    Err(_) => half(LANES),
                };
                (low, high)
            });
            good = ok_low && ok_high;
            for (o, (l, h)) in out.iter_mut().zip(low.iter().zip(&high)) {
                let mut acc = [0.0; SUMS];
                acc[..LANES].copy_from_slice(l);
                acc[LANES..].copy_from_slice(h);
                o.set_lanes(acc);
            }
            tail_from = from + whole * SUMS;
            if tail_from == n {
                return good.then_some(out);
            }
        }
        let skip = tail_from - from;
        let mut t = [[0.0f64; LANES]; S];
        self.rows(tail_from, refl, upto, with_f, init, |rel, _, m, v| {
            let rel = rel + skip;
            good &= terms(rel, 0..m, v, &mut t);
            for (o, t) in out.iter_mut().zip(&t) {
                o.push_block(rel, m, t);
            }
        });
        good.then_some(out)
    }

    /// Calls `f(rel, row, m, block)` for the rows from `from` on, a block of `m` ≤
    /// [`LANES`] at a time (`rel` the first one's place in the view that starts at `from`,
    /// a multiple of [`LANES`]; `row` its number among the used points), with the
    /// reflections `refl` applied (rows at or after `from` are below each of them) to the
    /// slots before `upto` and, `with_f`, to f; `init(row, lanes, block)` writes f first
    /// (in the lanes of the block's rows, `0..m`), from the block's original slots (all
    /// formed then).
    #[inline(always)]
    #[allow(clippy::too_many_arguments)]
    pub(super) fn rows(
        &self,
        from: usize,
        refl: &[Reflection],
        upto: usize,
        with_f: bool,
        init: impl Fn(usize, Range<usize>, &mut Block),
        mut f: impl FnMut(usize, usize, usize, &Block),
    ) {
        let mut used = self
            .points
            .iter()
            .filter(|p| p.included)
            .zip(self.logs.iter())
            .skip(from);
        let mut row = from;
        let mut v: Block = [[0.0; LANES]; SLOTS];
        let need = Self::slots_formed(self.p, upto, with_f);
        loop {
            let mut inp = Inputs::default();
            let mut m = 0;
            for (pt, &l) in used.by_ref().take(LANES) {
                inp.set(m, pt, l);
                m += 1;
            }
            if m == 0 {
                break;
            }
            self.reflected(&inp, need, row, 0..m, refl, upto, with_f, &init, &mut v);
            f(row - from, row, m, &v);
            row += m;
            if m < LANES {
                break;
            }
        }
    }

    /// Row `k` (lane 0 of the block) as [`Source::rows`] gives it, but the reflection
    /// numbered k (when `refl` reaches it) has row k as its first row.
    pub(super) fn row(
        &self,
        k: usize,
        refl: &[Reflection],
        upto: usize,
        with_f: bool,
        init: impl Fn(usize, Range<usize>, &mut Block),
    ) -> [f64; SLOTS] {
        let (pt, l) = self
            .points
            .iter()
            .filter(|p| p.included)
            .zip(self.logs.iter())
            .nth(k)
            .map(|(p, l)| (*p, *l))
            .unwrap_or((Measurement::new(f64::NAN, f64::NAN), f64::NAN));
        let mut inp = Inputs::default();
        inp.set(0, &pt, l);
        let mut v: Block = [[0.0; LANES]; SLOTS];
        self.scaled(&inp, &mut v, Self::slots_formed(self.p, upto, with_f));
        init(k, 0..1, &mut v);
        for (r, refl) in refl.iter().enumerate() {
            refl.apply(r, upto, with_f, &mut v, r == k);
        }
        std::array::from_fn(|j| v[j][0])
    }
}

/// √w = √(1/σ²), as the general solver takes the root of the weight 1/σ² it is given.
#[inline(always)]
pub(super) fn sqrt_weight(s: f64) -> f64 {
    (1.0 / (s * s)).sqrt()
}

/// Lane `i` of a block: one row's slots.
#[inline(always)]
pub(super) fn lane(v: &Block, i: usize) -> [f64; SLOTS] {
    std::array::from_fn(|j| v[j][i])
}
