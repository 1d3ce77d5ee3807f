//! Descendant walls (rank >= 3): where a wall of type ij crosses one of
//! type jk, a wall of type ik is born with central charge Z_ij + Z_jk, i.e.
//! mass m_ij + m_jk (both lie on the ray e^(i theta) R_+), and multiplicity
//! fixed by flatness (see [`super::jump`]).

use super::search::find_crossings;
use super::{GrowthLimit, Joint};
use crate::walls::{grow_wall, GrowContext, Origin, Wall, WallPoint, WallSeed};
use num_complex::Complex64;
use std::collections::HashSet;

fn mass_at(w: &Wall, seg: usize, frac: f64) -> f64 {
    w.points[seg].mass + frac * (w.points[seg + 1].mass - w.points[seg].mass)
}

/// Grows generations of child walls until none appear or a bound is hit.
/// `stats` counts the segment pairs looked at in the search (grid
/// entries, most rejected by their bounding boxes) and the joints that
/// could not be refined onto the walls' arcs.
pub fn grow_descendants(
    ctx: &GrowContext,
    walls: &mut Vec<Wall>,
    joints: &mut Vec<Joint>,
    stats: &mut super::Stats,
) -> GrowthLimit {
    let settings = ctx.settings;
    let rot = Complex64::from_polar(1.0, ctx.theta);
    let mut new_from = 0usize;
    let mut seen: HashSet<(usize, usize, usize, usize)> = HashSet::new();
    for generation in 1..=settings.max_generations {
        if ctx.cancel.is_cancelled() {
            return GrowthLimit::Cancelled;
        }
        let Some(mut found) = find_crossings(
            ctx.curve.rank,
            walls,
            joints,
            new_from,
            &mut seen,
            &mut stats.pair_tests,
            ctx.cancel,
        ) else {
            return GrowthLimit::Cancelled;
        };
        if found.is_empty() {
            return GrowthLimit::None;
        }
        // Deterministic order: by the parents' indices.
        found.sort_by(|x, y| {
            (x.first.0, x.first.1, x.second.0, x.second.1)
                .cmp(&(y.first.0, y.first.1, y.second.0, y.second.1))
        });
        new_from = walls.len();
        let mut inserts: Vec<(usize, usize, WallPoint)> = Vec::new();
        for f in found {
            if walls.len() >= settings.max_walls {
                return GrowthLimit::MaxWalls;
            }
            if ctx.cancel.is_cancelled() {
                return GrowthLimit::Cancelled;
            }
            let (wa, sa, fa) = f.first;
            let (wb, sb, fb) = f.second;
            let Ok(chord_roots) = ctx.curve.sheets_at(f.z) else {
                continue;
            };
            let (ka, kb) = (walls[wa].kind_at(sa), walls[wb].kind_at(sb));
            let (i, j, k) = (ka.i as usize, ka.j as usize, kb.j as usize);
            // The chords cross near, not at, the walls' crossing: refine it on
            // the cubic Hermite arcs through the segments' ends (the true
            // crossing may sit on a neighbouring segment).
            let refined = refine_near(
                ctx,
                walls,
                (wa, sa, fa),
                (wb, sb, fb),
                &chord_roots,
                f.z,
                (i, j, k),
            );
            let (z_joint, mass_a, mass_b, roots, seg_a, seg_b) = match refined {
                Some(r) => r,
                None => {
                    // Walls crossing at a shared point (or nearly tangent)
                    // defeat the refinement: keep the chords' crossing and
                    // count it, so the network can say so.
                    stats.joints_on_chord += 1;
                    (
                        f.z,
                        mass_at(&walls[wa], sa, fa),
                        mass_at(&walls[wb], sb, fb),
                        chord_roots,
                        sa,
                        sb,
                    )
                }
            };
            let mass = mass_a + mass_b;
            let v_a = rot / (roots[i] - roots[j]);
            let v_b = rot / (roots[j] - roots[k]);
            let (mu_a, mu_b) = (walls[wa].multiplicity_at(sa), walls[wb].multiplicity_at(sb));
            let mu = if (v_b / v_a).im > 0.0 {
                -mu_a * mu_b
            } else {
                mu_a * mu_b
            };
            if mu == 0 {
                continue;
            }
            if mass >= settings.reach {
                continue;
            }
            let joint_idx = joints.len();
            let seed = WallSeed {
                z: z_joint,
                roots,
                kind: f.child,
                mass,
                origin: Origin::Joint { index: joint_idx },
                generation: walls[wa].generation.max(walls[wb].generation) + 1,
                multiplicity: mu,
                prefix: Vec::<WallPoint>::new(),
            };
            joints.push(Joint {
                z: z_joint,
                parents: [wa, wb],
                child: walls.len(),
            });
            walls.push(grow_wall(ctx, seed));
            // The parents' polylines must pass through the joint itself, so
            // that paths and loops see the same crossing as the growth did.
            inserts.push((
                wa,
                seg_a,
                WallPoint {
                    z: z_joint,
                    mass: mass_a,
                },
            ));
            inserts.push((
                wb,
                seg_b,
                WallPoint {
                    z: z_joint,
                    mass: mass_b,
                },
            ));
        }
        insert_points(walls, &mut inserts);
        if generation == settings.max_generations {
            // Anything the last generation crosses is not followed.
            return GrowthLimit::MaxGenerations;
        }
    }
    GrowthLimit::None
}

/// The refined crossing of walls `a` (type ij) and `b` (type jk) near the
/// chord crossing of segments `a.1` and `b.1`: point, both masses, labelled
/// sheets there, and the segments it lies on.
#[allow(clippy::type_complexity)]
fn refine_near(
    ctx: &GrowContext,
    walls: &[Wall],
    a: (usize, usize, f64),
    b: (usize, usize, f64),
    chord_roots: &[Complex64],
    chord_z: Complex64,
    (i, j, k): (usize, usize, usize),
) -> Option<(Complex64, f64, f64, Vec<Complex64>, usize, usize)> {
    let (wa, wb) = (&walls[a.0], &walls[b.0]);
    let (ka, kb) = (wa.kind_at(a.1), wb.kind_at(b.1));
    for (da, db) in [
        (0, 0),
        (-1, 0),
        (1, 0),
        (0, -1),
        (0, 1),
        (-1, -1),
        (1, 1),
        (-1, 1),
        (1, -1),
    ] {
        let (Some(sa), Some(sb)) = (a.1.checked_add_signed(da), b.1.checked_add_signed(db)) else {
            continue;
        };
        if sa + 1 >= wa.points.len()
            || sb + 1 >= wb.points.len()
            || wa.kind_at(sa) != ka
            || wb.kind_at(sb) != kb
        {
            continue;
        }
        let start = |d: isize, f: f64| {
            if d == 0 {
                f
            } else if d < 0 {
                0.9
            } else {
                0.1
            }
        };
        let (Some(arc_a), Some(arc_b)) = (
            Arc::of(ctx, wa, sa, chord_roots, chord_z, (i, j)),
            Arc::of(ctx, wb, sb, chord_roots, chord_z, (j, k)),
        ) else {
            continue;
        };
        if let Some((ta, tb)) = refine(&arc_a, &arc_b, start(da, a.2), start(db, b.2)) {
            let z = arc_a.at(ta);
            if let Some(roots) = ctx.curve.step_roots(chord_roots, z) {
                return Some((z, arc_a.mass_at(ta), arc_b.mass_at(tb), roots, sa, sb));
            }
        }
    }
    None
}

/// Inserts joint points into their walls' segments, keeping masses
/// increasing and relabel indices pointing at the same points.
fn insert_points(walls: &mut [Wall], inserts: &mut Vec<(usize, usize, WallPoint)>) {
    // Later segments (and, within a segment, larger masses) first, so that
    // earlier insertion positions stay valid.
    inserts.sort_by(|a, b| {
        (a.0, b.1)
            .cmp(&(b.0, a.1))
            .then(b.2.mass.total_cmp(&a.2.mass))
    });
    for (w, seg, point) in inserts.drain(..) {
        let wall = &mut walls[w];
        let (m0, m1) = (wall.points[seg].mass, wall.points[seg + 1].mass);
        if !(point.mass > m0 && point.mass < m1) {
            continue;
        }
        wall.points.insert(seg + 1, point);
        for r in &mut wall.relabels {
            if r.from > seg {
                r.from += 1;
            }
        }
    }
}

/// A wall segment as a cubic Hermite arc in its mass parameter: ends `z0`,
/// `z1` at masses `t0`, `t1`, with the exact directions `dz/dt` there.
struct Arc {
    z0: Complex64,
    z1: Complex64,
    d0: Complex64,
    d1: Complex64,
    t0: f64,
    h: f64,
}

impl Arc {
    /// The arc of segment `seg` of `wall`, whose type there is `(i, j)`;
    /// `roots` are the labelled sheets at `near`, a point on the segment.
    fn of(
        ctx: &GrowContext,
        wall: &Wall,
        seg: usize,
        roots: &[Complex64],
        near: Complex64,
        (i, j): (usize, usize),
    ) -> Option<Self> {
        let rot = Complex64::from_polar(1.0, ctx.theta);
        let (p0, p1) = (wall.points[seg], wall.points[seg + 1]);
        let h = p1.mass - p0.mass;
        if h.is_nan() || h <= 0.0 {
            return None;
        }
        let mut budget = 2000;
        // The segment lies on one side of every cut, so continuing the
        // sheets along it keeps the labels.
        let r0 = ctx
            .curve
            .continue_roots(roots, near, p0.z, &mut budget)
            .ok()?;
        let r1 = ctx
            .curve
            .continue_roots(roots, near, p1.z, &mut budget)
            .ok()?;
        let v0 = rot / (r0[i] - r0[j]);
        let v1 = rot / (r1[i] - r1[j]);
        (v0.is_finite() && v1.is_finite()).then_some(Self {
            z0: p0.z,
            z1: p1.z,
            d0: v0 * h,
            d1: v1 * h,
            t0: p0.mass,
            h,
        })
    }

    fn at(&self, s: f64) -> Complex64 {
        crate::walls::hermite(self.z0, self.d0, self.z1, self.d1, s)
    }

    fn slope(&self, s: f64) -> Complex64 {
        let s2 = s * s;
        self.z0 * (6.0 * s2 - 6.0 * s)
            + self.d0 * (3.0 * s2 - 4.0 * s + 1.0)
            + self.z1 * (-6.0 * s2 + 6.0 * s)
            + self.d1 * (3.0 * s2 - 2.0 * s)
    }

    fn mass_at(&self, s: f64) -> f64 {
        self.t0 + s * self.h
    }
}

/// Newton's method on `a(sa) = b(sb)` from the chords' crossing.
fn refine(a: &Arc, b: &Arc, sa0: f64, sb0: f64) -> Option<(f64, f64)> {
    let (mut sa, mut sb) = (sa0, sb0);
    for _ in 0..12 {
        let f = a.at(sa) - b.at(sb);
        let (da, db) = (a.slope(sa), -b.slope(sb));
        let det = da.re * db.im - da.im * db.re;
        if det == 0.0 || !det.is_finite() {
            return None;
        }
        let dsa = -(f.re * db.im - f.im * db.re) / det;
        let dsb = -(da.re * f.im - da.im * f.re) / det;
        sa += dsa;
        sb += dsb;
        if !(-0.25..=1.25).contains(&sa) || !(-0.25..=1.25).contains(&sb) {
            return None;
        }
        if dsa.abs() + dsb.abs() < 1e-15 {
            break;
        }
    }
    // Only a crossing inside both segments is this crossing.
    ((0.0..1.0).contains(&sa) && (0.0..1.0).contains(&sb)).then_some((sa, sb))
}
