//! Descendant walls (rank >= 3): where a wall of type ij crosses one of
//! type jk, a wall of type ik is born with central charge Z_ij + Z_jk, i.e.
//! mass m_ij + m_jk (both lie on the ray e^(i theta) R_+), and multiplicity
//! fixed by flatness (see [`super::jump`]).

use super::crossings::SegmentGrid;
use super::jump::segment_intersection;
use super::{GrowthLimit, Joint};
use crate::walls::{grow_wall, GrowContext, Origin, Wall, WallPoint, WallSeed, WallType};
use num_complex::Complex64;
use std::collections::HashSet;

/// A crossing of two composable segments.
struct Found {
    z: Complex64,
    /// (wall, segment, fraction) of the ij parent and of the jk parent.
    first: (usize, usize, f64),
    second: (usize, usize, f64),
    child: WallType,
}

fn mass_at(w: &Wall, seg: usize, frac: f64) -> f64 {
    w.points[seg].mass + frac * (w.points[seg + 1].mass - w.points[seg].mass)
}

/// The child type if `a` (ij) and `b` (jk) compose, in that order.
fn compose(a: WallType, b: WallType) -> Option<WallType> {
    (a.j == b.i && a.i != b.j).then_some(WallType { i: a.i, j: b.j })
}

/// True if `child` was born where `other` (one of its parents) crosses its first point.
fn is_birth_point(
    walls: &[Wall],
    joints: &[Joint],
    child: usize,
    other: usize,
    z: Complex64,
) -> bool {
    match walls[child].origin {
        Origin::Joint { index } => {
            let j = &joints[index];
            j.parents.contains(&other) && (z - j.z).norm() <= 1e-9 * (1.0 + z.norm())
        }
        Origin::BranchPoint { .. } => false,
    }
}

/// Grows generations of child walls until none appear or a bound is hit.
pub fn grow_descendants(
    ctx: &GrowContext,
    walls: &mut Vec<Wall>,
    joints: &mut Vec<Joint>,
) -> GrowthLimit {
    let settings = ctx.settings;
    let rot = Complex64::from_polar(1.0, ctx.theta);
    let mut new_from = 0usize;
    let mut seen: HashSet<(usize, usize, usize, usize)> = HashSet::new();
    for generation in 1..=settings.max_generations {
        if ctx.cancel.is_cancelled() {
            return GrowthLimit::Cancelled;
        }
        let grid = SegmentGrid::build(walls);
        let mut found: Vec<Found> = Vec::new();
        for wa in new_from..walls.len() {
            let a = &walls[wa];
            for sa in 0..a.points.len().saturating_sub(1) {
                let (p0, p1) = (a.points[sa].z, a.points[sa + 1].z);
                for (wb, sb) in grid.candidates(p0, p1) {
                    // Pairs of two new walls are visited from the lower index only.
                    if wb == wa || (wb >= new_from && wb < wa) {
                        continue;
                    }
                    let b = &walls[wb];
                    let (ka, kb) = (a.kind_at(sa), b.kind_at(sb));
                    let order = if let Some(c) = compose(ka, kb) {
                        Some((c, true))
                    } else {
                        compose(kb, ka).map(|c| (c, false))
                    };
                    let Some((child, a_first)) = order else {
                        continue;
                    };
                    let (q0, q1) = (b.points[sb].z, b.points[sb + 1].z);
                    let Some((fa, fb)) = segment_intersection(p0, p1, q0, q1) else {
                        continue;
                    };
                    let z = p0 + (p1 - p0) * fa;
                    if is_birth_point(walls, joints, wa, wb, z)
                        || is_birth_point(walls, joints, wb, wa, z)
                    {
                        continue;
                    }
                    let key = if wa < wb {
                        (wa, sa, wb, sb)
                    } else {
                        (wb, sb, wa, sa)
                    };
                    if !seen.insert(key) {
                        continue;
                    }
                    let (first, second) = if a_first {
                        ((wa, sa, fa), (wb, sb, fb))
                    } else {
                        ((wb, sb, fb), (wa, sa, fa))
                    };
                    found.push(Found {
                        z,
                        first,
                        second,
                        child,
                    });
                }
            }
        }
        if found.is_empty() {
            return GrowthLimit::None;
        }
        // Deterministic order: by the parents' indices.
        found.sort_by(|x, y| {
            (x.first.0, x.first.1, x.second.0, x.second.1)
                .cmp(&(y.first.0, y.first.1, y.second.0, y.second.1))
        });
        new_from = walls.len();
        for f in found {
            if walls.len() >= settings.max_walls {
                return GrowthLimit::MaxWalls;
            }
            if ctx.cancel.is_cancelled() {
                return GrowthLimit::Cancelled;
            }
            let (wa, sa, fa) = f.first;
            let (wb, sb, fb) = f.second;
            let Ok(roots) = ctx.curve.sheets_at(f.z) else {
                continue;
            };
            let (ka, kb) = (walls[wa].kind_at(sa), walls[wb].kind_at(sb));
            let (i, j, k) = (ka.i as usize, ka.j as usize, kb.j as usize);
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
            let mass = mass_at(&walls[wa], sa, fa) + mass_at(&walls[wb], sb, fb);
            if mass >= settings.reach {
                continue;
            }
            let joint_idx = joints.len();
            let seed = WallSeed {
                z: f.z,
                roots,
                kind: f.child,
                mass,
                origin: Origin::Joint { index: joint_idx },
                generation: walls[wa].generation.max(walls[wb].generation) + 1,
                multiplicity: mu,
                prefix: Vec::<WallPoint>::new(),
            };
            joints.push(Joint {
                z: f.z,
                parents: [wa, wb],
                child: walls.len(),
            });
            walls.push(grow_wall(ctx, seed));
        }
        if generation == settings.max_generations {
            // Anything the last generation crosses is not followed.
            return GrowthLimit::MaxGenerations;
        }
    }
    GrowthLimit::None
}
