//! How the window looks at the document: the part of the plane shown, the
//! selection, the tool, the animation, table order. None of it is undone;
//! only the view goes into a saved scenario. [`Interaction`] is the
//! gesture state the widgets keep for themselves between frames.

use super::command::{PointRef, Selection, Tool, WallSort};
use super::screen::ScreenTransform;
use crate::scene::View;
use num_complex::Complex64;

pub struct ViewState {
    /// The part of the z-plane on the canvas.
    pub plane: View,
    pub selection: Option<Selection>,
    pub tool: Tool,
    /// Order of the punctures the canvas adds.
    pub new_pole_order: u32,
    /// Wall types written beside the walls.
    pub wall_labels: bool,
    /// The polyline drawn with the path tool.
    pub path_in_plane: Vec<Complex64>,
    pub wall_sort: WallSort,
    pub wall_sort_descending: bool,
    pub playback: Playback,
    /// The part of the central-charge plane shown; `None` fits the states.
    pub charges_view: Option<View>,
}

impl ViewState {
    pub fn new(plane: View) -> Self {
        Self {
            plane,
            selection: None,
            tool: Tool::Select,
            new_pole_order: 2,
            wall_labels: false,
            path_in_plane: Vec::new(),
            wall_sort: WallSort::Index,
            wall_sort_descending: false,
            playback: Playback::default(),
            charges_view: None,
        }
    }

    /// The selected wall's index.
    pub fn selected_wall(&self) -> Option<usize> {
        match self.selection {
            Some(Selection::Wall { wall, .. }) => Some(wall),
            _ => None,
        }
    }

    /// The selected BPS state's index.
    pub fn selected_state(&self) -> Option<usize> {
        match self.selection {
            Some(Selection::State(i)) => Some(i),
            _ => None,
        }
    }
}

/// The phase animation.
pub struct Playback {
    pub playing: bool,
    pub speed_deg_per_s: f64,
    /// Start again at 0 after a full turn (else stop there).
    pub looping: bool,
}

impl Default for Playback {
    fn default() -> Self {
        Self {
            playing: false,
            speed_deg_per_s: 10.0,
            looping: true,
        }
    }
}

/// What a canvas drag is doing.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DragState {
    Pan,
    Point(PointRef),
}

/// What is under the pointer on the canvas.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Hit {
    Point(PointRef),
    BranchPoint(usize),
    Puncture(usize),
    /// A wall, the index of the segment's first point, and the mass at the
    /// nearest point of the segment.
    Wall {
        wall: usize,
        point: usize,
        mass: f64,
    },
}

/// Gesture state of the widgets, and where they were drawn in the last
/// frame (hit tests, and tests that click at plane points). The widgets
/// write a copy during the frame; the app takes it back at the end, so
/// that what panels read stays as the frame began.
#[derive(Clone, Copy, Debug, Default)]
pub struct Interaction {
    pub drag: Option<DragState>,
    /// Where the canvas's context menu was opened, and what was there.
    pub context_target: Option<(Complex64, Option<Hit>)>,
    /// The phase slider is being dragged.
    pub phase_dragging: bool,
    pub canvas_transform: Option<ScreenTransform>,
    pub charges_transform: Option<ScreenTransform>,
}

impl Interaction {
    /// A drag or the phase slider is under way: recompute without
    /// cancelling, so that results keep arriving at the engine's pace.
    pub fn is_dragging(&self) -> bool {
        self.drag.is_some() || self.phase_dragging
    }
}
