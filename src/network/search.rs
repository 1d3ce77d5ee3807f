//! The crossing search of one generation: every crossing of a new wall's
//! segment with a segment it composes with (ij with jk, or ki with ij),
//! each pair of segments once.
//!
//! Segments are filed in one grid per wall type (the type that holds on
//! the segment), and a query asks only the grids of the types that compose
//! with its own: two of the five others at rank 3. Big networks grow
//! bundles of walls of one type that flow together (into a pole, say) and
//! cross each other's chords millions of times; those pairs can never make
//! a joint, and now they are never looked at.
//!
//! Each pair is found from its shorter segment: a segment asks only the
//! grid levels at and above its own, where its box covers at most 3 x 3
//! cells, so the search costs a bounded amount per segment (times the
//! number of levels) plus the pairs it reports, never a walk over the
//! cells of a long segment's box. New segments ask the grids of the old
//! walls and of the new ones; old segments ask the new walls' grids on
//! the levels above their own. Whoever finds a pair, it is measured from
//! the side the growth has always used (the new wall, or the lower index
//! of two new walls), so the joints are the same to the last bit.

use super::crossings::SegmentGrid;
use super::jump::segment_intersection;
use super::Joint;
use crate::cancel::CancelToken;
use crate::walls::{Origin, Wall, WallType};
use num_complex::Complex64;
use std::collections::HashSet;

/// A crossing of two composable segments.
pub struct Found {
    pub z: Complex64,
    /// (wall, segment, fraction) of the ij parent and of the jk parent.
    pub first: (usize, usize, f64),
    pub second: (usize, usize, f64),
    pub child: WallType,
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
        Origin::BranchPoint { .. } | Origin::Puncture { .. } => false,
    }
}

/// Segment pairs looked at between two polls of the cancel token (a poll
/// comes after the first query that reaches this many), so that a cancel
/// stops even the largest search promptly.
pub const PAIRS_PER_POLL: u64 = 4096;

/// Segments of some walls filed by wall type, in grids that share one
/// frame.
struct GridsByType {
    rank: usize,
    /// Indexed by `i * rank + j` for type ij.
    grids: Vec<SegmentGrid>,
}

impl GridsByType {
    fn new(rank: usize, frame: &SegmentGrid) -> Self {
        Self {
            rank,
            grids: vec![frame.clone(); rank * rank],
        }
    }

    fn index(&self, kind: WallType) -> usize {
        usize::from(kind.i) * self.rank + usize::from(kind.j)
    }

    /// Files every segment of wall `wall_idx` under the type it has there.
    fn insert_wall(&mut self, walls: &[Wall], wall_idx: usize) {
        let w = &walls[wall_idx];
        for k in 0..w.points.len().saturating_sub(1) {
            let t = self.index(w.kind_at(k));
            self.grids[t].insert(wall_idx, k, w.points[k].z, w.points[k + 1].z);
        }
    }
}

/// For each type `i * rank + j`, the types that compose with it in either
/// order (ij with jk, ki with ij).
fn partner_types(rank: usize) -> Vec<Vec<usize>> {
    let types: Vec<WallType> = (0..rank * rank)
        .map(|t| WallType::new(t / rank, t % rank))
        .collect();
    types
        .iter()
        .map(|&a| {
            (0..types.len())
                .filter(|&t| {
                    let b = types[t];
                    b.i != b.j && (compose(a, b).is_some() || compose(b, a).is_some())
                })
                .collect()
        })
        .collect()
}

/// The cancel token, polled after every [`PAIRS_PER_POLL`] entries looked at.
struct Poller<'a> {
    cancel: &'a CancelToken,
    next: u64,
}

impl Poller<'_> {
    /// False once the token is cancelled (checked when `looked` passes the next poll).
    fn go_on(&mut self, looked: u64) -> bool {
        if looked < self.next {
            return true;
        }
        self.next = looked + PAIRS_PER_POLL;
        !self.cancel.is_cancelled()
    }
}

/// Every crossing of a segment of walls `new_from..` with a composable
/// segment of any wall, except where a child leaves its parent and pairs
/// already in `seen`; in no particular order. `pair_tests` counts the grid
/// entries looked at; `None` if `cancel` was set.
pub fn find_crossings(
    rank: usize,
    walls: &[Wall],
    joints: &[Joint],
    new_from: usize,
    seen: &mut HashSet<(usize, usize, usize, usize)>,
    pair_tests: &mut u64,
    cancel: &CancelToken,
) -> Option<Vec<Found>> {
    let frame = SegmentGrid::empty_for(walls);
    let partners = partner_types(rank);
    let (mut old, mut new) = (
        GridsByType::new(rank, &frame),
        GridsByType::new(rank, &frame),
    );
    for w in 0..walls.len() {
        if w < new_from {
            old.insert_wall(walls, w);
        } else {
            new.insert_wall(walls, w);
        }
    }
    let mut poll = Poller {
        cancel,
        next: *pair_tests + PAIRS_PER_POLL,
    };
    let mut found = Vec::new();
    let mut candidates: Vec<(usize, usize)> = Vec::new();
    for wa in 0..walls.len() {
        let a = &walls[wa];
        for sa in 0..a.points.len().saturating_sub(1) {
            let (p0, p1) = (a.points[sa].z, a.points[sa + 1].z);
            let Some(level) = frame.level_of(p0, p1) else {
                continue;
            };
            let is_new = wa >= new_from;
            for &t in &partners[old.index(a.kind_at(sa))] {
                if is_new {
                    // New against old: from the new side, levels at and above.
                    *pair_tests +=
                        old.grids[t].candidates_from_level_into(p0, p1, level, &mut candidates)
                            as u64;
                    for &(wb, sb) in &candidates {
                        found.extend(crossing(walls, joints, seen, (wa, sa), (wb, sb)));
                    }
                }
                // Against new walls: levels above this segment's, and its
                // own level from new segments only, each pair from the
                // lower wall index.
                let from = if is_new { level } else { level + 1 };
                *pair_tests +=
                    new.grids[t].candidates_from_level_into(p0, p1, from, &mut candidates) as u64;
                for &(wb, sb) in &candidates {
                    if wb == wa {
                        continue;
                    }
                    if is_new {
                        let other = &walls[wb];
                        let same_level = frame.level_of(other.points[sb].z, other.points[sb + 1].z)
                            == Some(level);
                        if same_level && wb < wa {
                            continue;
                        }
                    }
                    // The new side (the lower index of two new walls) measures.
                    let pair = if is_new && wa < wb {
                        crossing(walls, joints, seen, (wa, sa), (wb, sb))
                    } else {
                        crossing(walls, joints, seen, (wb, sb), (wa, sa))
                    };
                    found.extend(pair);
                }
                if !poll.go_on(*pair_tests) {
                    return None;
                }
            }
        }
    }
    Some(found)
}

/// The crossing of segment `sa` of wall `wa` with segment `sb` of wall
/// `wb` (of composable types), unless it is a child's birth point, the
/// shared first point of two walls, or already in `seen`.
fn crossing(
    walls: &[Wall],
    joints: &[Joint],
    seen: &mut HashSet<(usize, usize, usize, usize)>,
    (wa, sa): (usize, usize),
    (wb, sb): (usize, usize),
) -> Option<Found> {
    let (a, b) = (&walls[wa], &walls[wb]);
    let (ka, kb) = (a.kind_at(sa), b.kind_at(sb));
    let (child, a_first) = match compose(ka, kb) {
        Some(c) => (c, true),
        None => (compose(kb, ka)?, false),
    };
    let (p0, p1) = (a.points[sa].z, a.points[sa + 1].z);
    let (q0, q1) = (b.points[sb].z, b.points[sb + 1].z);
    // Walls that leave one point meet only there.
    if sa == 0 && sb == 0 && a.points[0].z == b.points[0].z {
        return None;
    }
    let (fa, fb) = segment_intersection(p0, p1, q0, q1)?;
    let z = p0 + (p1 - p0) * fa;
    if is_birth_point(walls, joints, wa, wb, z) || is_birth_point(walls, joints, wb, wa, z) {
        return None;
    }
    let key = if wa < wb {
        (wa, sa, wb, sb)
    } else {
        (wb, sb, wa, sa)
    };
    if !seen.insert(key) {
        return None;
    }
    let (first, second) = if a_first {
        ((wa, sa, fa), (wb, sb, fb))
    } else {
        ((wb, sb, fb), (wa, sa, fa))
    };
    Some(Found {
        z,
        first,
        second,
        child,
    })
}
