//! Resolving the size of a coil: from two of outer diameter, inner diameter
//! and turns, the third; or as many turns as fit.
//!
//! Sizes are measured on the copper the spiral really makes (edges of the
//! traces), by building the spiral and measuring it, so that the three
//! numbers always describe the same coil. Monotonic relations are solved by
//! [`largest_feasible`] (Illinois steps with a bisection safeguard), to a
//! few units in the last place.
//!
//! # Units
//! Millimetres.

use super::spiral::SpiralSpec;
pub use crate::design::TurnsRequest;
use crate::design::{Corner, Shape};
use crate::numeric::roots::largest_feasible;
use std::cell::RefCell;
use std::collections::HashMap;
use std::thread::LocalKey;

/// The inputs of a fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FitInput {
    /// Shape (a rectangle carries its outer width and height).
    pub shape: Shape,
    /// Corner style.
    pub corner: Corner,
    /// Track width, mm.
    pub trace_width: f64,
    /// Gap between turns, mm.
    pub clearance: f64,
    /// Outer diameter, mm (circle and polygon; ignored for a rectangle).
    pub outer_diameter: Option<f64>,
    /// Inner (free centre) diameter, mm.
    pub inner_diameter: Option<f64>,
    /// Turns per layer.
    pub turns: Option<TurnsRequest>,
    /// Smallest free centre that holds the centre vias, mm.
    pub min_inner_diameter: f64,
}

/// All three sizes.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fit {
    /// Outer diameter, mm (rectangle: its diagonal).
    pub outer_diameter: f64,
    /// Inner diameter, mm.
    pub inner_diameter: f64,
    /// Turns per layer.
    pub turns: f64,
}

/// Why the sizes do not make a coil.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum FitError {
    /// Not exactly two of the three were given.
    #[error(
        "give exactly two of outer_diameter, inner_diameter and turns (a rectangle takes width and height plus one of inner_diameter or turns)"
    )]
    NeedTwo,
    /// The requested turns do not fit between the given diameters.
    #[error("{requested} turns do not fit; at most {max:.2} fit")]
    TooManyTurns {
        /// Requested turns.
        requested: f64,
        /// Most that fit.
        max: f64,
    },
    /// The free centre cannot hold the centre vias.
    #[error(
        "inner diameter {given:.3} mm is too small for the centre vias; the minimum is {min:.3} mm"
    )]
    InnerTooSmall {
        /// Given or implied inner diameter, mm.
        given: f64,
        /// Minimum, mm.
        min: f64,
    },
    /// The inner diameter is not smaller than the outer.
    #[error("inner diameter must be smaller than the outer size minus one trace")]
    InnerNotInside,
    /// Rounded corners larger than the innermost side.
    #[error("corner radius {radius:.3} mm is too large; it must be below {max:.3} mm")]
    CornerTooLarge {
        /// Requested radius, mm.
        radius: f64,
        /// Largest radius that fits, mm.
        max: f64,
    },
}

/// How far [`FitInput::buildable_inner`] looks for a buildable innermost
/// turn, mm.
const MAX_INNER_SEARCH_MM: f64 = 1000.0;

/// A thread's remembered answers, by the debug text of their inputs.
type Seen<V> = RefCell<HashMap<String, V>>;

/// Answers remembered per thread by [`remembered`] (all forgotten when
/// full).
const REMEMBERED: usize = 16_384;

/// `compute()`, remembered in this thread's `seen` under `key`: the debug
/// text of every input it depends on (each number at its shortest exact
/// digits, so equal text is equal inputs, and the answer depends only on
/// them).
fn remembered<V: Clone>(
    seen: &'static LocalKey<Seen<V>>,
    key: String,
    compute: impl FnOnce() -> V,
) -> V {
    if let Some(hit) = seen.with(|s| s.borrow().get(&key).cloned()) {
        return hit;
    }
    let found = compute();
    seen.with(|s| {
        let mut s = s.borrow_mut();
        if s.len() >= REMEMBERED {
            s.clear();
        }
        s.insert(key, found.clone());
    });
    found
}

impl FitInput {
    /// The spiral's `inner` parameter for a free-centre diameter.
    fn inner_param(&self, inner_diameter: f64) -> f64 {
        self.shape.spiral_inner(inner_diameter, self.trace_width)
    }

    /// Free-centre diameter for a spiral `inner` parameter.
    fn inner_diameter_of(&self, inner: f64) -> f64 {
        self.shape.inner_diameter_of(inner, self.trace_width)
    }

    fn spiral(&self, inner: f64, turns: f64) -> SpiralSpec {
        SpiralSpec {
            shape: self.shape,
            corner: self.corner,
            pitch: self.trace_width + self.clearance,
            inner,
            turns,
        }
    }

    /// How far the copper pokes beyond the outer size (negative = inside), mm.
    fn excess(&self, inner: f64, turns: f64, outer: f64) -> Result<f64, FitError> {
        let segs = self.spiral(inner, turns).segments().map_err(|e| match e {
            super::spiral::SpiralError::CornerTooLarge { radius, max } => {
                FitError::CornerTooLarge { radius, max }
            }
            _ => FitError::InnerNotInside,
        })?;
        Ok(self.shape.overreach(&segs, self.trace_width / 2.0, outer))
    }

    /// Outer diameter of the built copper, mm (a shape with its own size:
    /// its diagonal).
    fn outer_of(&self, inner: f64, turns: f64) -> Result<f64, FitError> {
        match self.shape.own_size() {
            Some((width, height)) => Ok(width.hypot(height)),
            None if self.shape.carries_size() => {
                // A sector: the circle about the axis holding its copper.
                let segs = self
                    .spiral(inner, turns)
                    .segments()
                    .map_err(|_| FitError::InnerNotInside)?;
                Ok(2.0 * (super::spiral::radial_extent(&segs).1 + self.trace_width / 2.0))
            }
            None => Ok(2.0 * (self.excess(inner, turns, 0.0)?)),
        }
    }

    /// The outer size to fit into, mm (a shape with its own size: an unused
    /// placeholder).
    fn outer_limit(&self) -> Option<f64> {
        if self.shape.carries_size() {
            Some(0.0)
        } else {
            self.outer_diameter
        }
    }

    /// The smallest spiral `inner` parameter from `inner` up whose
    /// innermost turn can be built: `inner` itself except for a sector,
    /// whose sides converge towards the ring's centre, so that too small
    /// an innermost turn closes before its inner arc (found by doubling,
    /// then bisection to 1 nm); `inner` when none builds.
    fn buildable_inner(&self, inner: f64) -> f64 {
        let builds = |x: f64| self.spiral(x, 1.0).segments().is_ok();
        if !self.shape.whole_turns() || builds(inner) {
            return inner;
        }
        let (mut lo, mut step) = (inner, inner.max(0.01));
        let mut hi = inner + step;
        while !builds(hi) {
            lo = hi;
            step *= 2.0;
            hi = inner + step;
            if step > MAX_INNER_SEARCH_MM {
                return inner;
            }
        }
        while hi - lo > 1e-6 {
            let mid = 0.5 * (lo + hi);
            if builds(mid) {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        hi
    }

    /// Most turns that fit with the free centre `inner` (bracketed by
    /// doubling, then [`largest_feasible`]), [`remembered`] per thread: a
    /// sweep asks again for every turn count that does not fit the same
    /// coil (for the message that says how many would).
    fn max_turns(&self, inner: f64, outer: f64) -> Result<f64, FitError> {
        thread_local! {
            static SEEN: Seen<Result<f64, FitError>> = RefCell::new(HashMap::new());
        }
        // Only what the spiral depends on: not the turns asked for.
        let key = format!(
            "{:?} {:?} {:?} {:?} {inner:?} {outer:?}",
            self.shape, self.corner, self.trace_width, self.clearance
        );
        remembered(&SEEN, key, || self.max_turns_uncached(inner, outer))
    }

    /// [`FitInput::max_turns`] computed.
    fn max_turns_uncached(&self, inner: f64, outer: f64) -> Result<f64, FitError> {
        let (mut lo, mut hi) = (1e-6, 1.0);
        let mut f_lo = self.excess(inner, lo, outer)?;
        if f_lo > 0.0 {
            return Ok(0.0);
        }
        let mut f_hi = self.excess(inner, hi, outer)?;
        while f_hi <= 0.0 {
            (lo, f_lo) = (hi, f_hi);
            hi *= 2.0;
            if hi > 1e6 {
                return Err(FitError::InnerNotInside);
            }
            f_hi = self.excess(inner, hi, outer)?;
        }
        largest_feasible(
            |t| self.excess(inner, t, outer),
            (lo, f_lo),
            (hi, f_hi),
            0.0,
        )
    }

    /// Resolves all three sizes, remembered per thread by their exact
    /// inputs (`remembered`): a sweep that varies other keys (layers, the
    /// drive) asks for the same sizes again and again.
    pub fn resolve(&self) -> Result<Fit, FitError> {
        thread_local! {
            static SEEN: Seen<Result<Fit, FitError>> = RefCell::new(HashMap::new());
        }
        remembered(&SEEN, format!("{self:?}"), || self.resolve_uncached())
    }

    /// [`FitInput::resolve`] computed.
    fn resolve_uncached(&self) -> Result<Fit, FitError> {
        let outer = self.outer_limit();
        let min_id = self.min_inner_diameter;
        if self.shape.whole_turns()
            && let (Some(od), Some(TurnsRequest::Max)) = (outer, self.turns)
        {
            // Whole turns only: as many as fit with the smallest free
            // centre, then the free centre as large as that many allow.
            let inner = self.buildable_inner(self.inner_param(min_id));
            let t = self.max_turns(inner, od)?.floor();
            if t < 1.0 {
                return Err(FitError::InnerTooSmall {
                    given: min_id,
                    min: min_id,
                });
            }
            return FitInput {
                turns: Some(TurnsRequest::Count(t)),
                ..*self
            }
            .resolve_uncached();
        }
        let check_inner = |id: f64| {
            if id < min_id - 1e-9 {
                Err(FitError::InnerTooSmall {
                    given: id,
                    min: min_id,
                })
            } else {
                Ok(())
            }
        };
        match (outer, self.inner_diameter, self.turns) {
            (Some(od), Some(id), None) | (Some(od), Some(id), Some(TurnsRequest::Max)) => {
                check_inner(id)?;
                let t = self.max_turns(self.inner_param(id), od)?;
                if t <= 0.0 {
                    return Err(FitError::InnerNotInside);
                }
                let t = if self.turns.is_some() {
                    (t * 100.0).floor() / 100.0
                } else {
                    t
                };
                Ok(Fit {
                    outer_diameter: self.outer_of(self.inner_param(id), t)?.max(0.0),
                    inner_diameter: id,
                    turns: t,
                })
            }
            (Some(od), None, Some(TurnsRequest::Max)) => {
                let inner = self.inner_param(min_id);
                let t = (self.max_turns(inner, od)? * 100.0).floor() / 100.0;
                if t <= 0.0 {
                    return Err(FitError::InnerTooSmall {
                        given: min_id,
                        min: min_id,
                    });
                }
                Ok(Fit {
                    outer_diameter: self.outer_of(inner, t)?,
                    inner_diameter: min_id,
                    turns: t,
                })
            }
            (Some(od), None, Some(TurnsRequest::Count(t))) => {
                // Largest free centre such that `t` turns fit inside `od`.
                let lo_inner = self.buildable_inner(self.inner_param(min_id));
                let mut f_lo = self.excess(lo_inner, t, od)?;
                if f_lo > 0.0 {
                    let most = self.max_turns(lo_inner, od)?;
                    let max = if self.shape.whole_turns() {
                        most.floor()
                    } else {
                        (most * 100.0).floor() / 100.0
                    };
                    return Err(FitError::TooManyTurns { requested: t, max });
                }
                let (mut lo, mut hi) = (lo_inner, lo_inner + 1.0);
                let mut f_hi = self.excess(hi, t, od)?;
                while f_hi <= 0.0 {
                    (lo, f_lo) = (hi, f_hi);
                    hi += hi;
                    f_hi = self.excess(hi, t, od)?;
                }
                let lo = largest_feasible(|x| self.excess(x, t, od), (lo, f_lo), (hi, f_hi), 0.0)?;
                Ok(Fit {
                    outer_diameter: self.outer_of(lo, t)?,
                    inner_diameter: self.inner_diameter_of(lo),
                    turns: t,
                })
            }
            (None, Some(id), Some(TurnsRequest::Count(t))) if !self.shape.carries_size() => {
                check_inner(id)?;
                Ok(Fit {
                    outer_diameter: self.outer_of(self.inner_param(id), t)?,
                    inner_diameter: id,
                    turns: t,
                })
            }
            _ => Err(FitError::NeedTwo),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn input(od: Option<f64>, id: Option<f64>, t: Option<TurnsRequest>) -> FitInput {
        FitInput {
            shape: Shape::Circle,
            corner: Corner::Sharp,
            trace_width: 0.1,
            clearance: 0.1,
            outer_diameter: od,
            inner_diameter: id,
            turns: t,
            min_inner_diameter: 1.0,
        }
    }

    #[test]
    fn circle_sizes_agree_with_closed_form() {
        // OD = ID + 2 T p + 2 w for the two-centre spiral.
        let f = input(None, Some(4.0), Some(TurnsRequest::Count(10.0)))
            .resolve()
            .unwrap();
        assert!((f.outer_diameter - (4.0 + 2.0 * 10.0 * 0.2 + 0.2)).abs() < 1e-9);
        let g = input(Some(8.2), Some(4.0), None).resolve().unwrap();
        assert!((g.turns - 10.0).abs() < 1e-6, "{}", g.turns);
        let h = input(Some(8.2), None, Some(TurnsRequest::Count(10.0)))
            .resolve()
            .unwrap();
        assert!((h.inner_diameter - 4.0).abs() < 1e-9);
    }

    #[test]
    fn too_many_turns_says_how_many_fit() {
        let e = input(Some(8.2), None, Some(TurnsRequest::Count(30.0)))
            .resolve()
            .unwrap_err();
        match e {
            FitError::TooManyTurns { max, .. } => assert!((max - 17.5).abs() < 0.011, "{max}"),
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn max_turns_uses_minimum_centre() {
        let f = input(Some(8.2), None, Some(TurnsRequest::Max))
            .resolve()
            .unwrap();
        assert_eq!(f.inner_diameter, 1.0);
        assert!((f.turns - 17.5).abs() < 0.011);
    }
}
