//! What the UI asks for. Widgets push commands; the app handles them all in
//! one place per frame, which is also where undo snapshots are taken.

use crate::scenario::Theme;
use num_complex::Complex64;
use std::path::PathBuf;

/// An editable point of a factored (quadratic) curve, by index into the
/// scenario's `zeros` or `poles`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PointRef {
    Zero(usize),
    Pole(usize),
}

/// What is selected on the canvas or in the inspector.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Selection {
    /// A wall, and the point index where it was picked (the wall's type
    /// can change along it where it crosses a cut).
    Wall {
        wall: usize,
        point: usize,
    },
    Point(PointRef),
    /// A branch point of a curve typed as an equation (not editable).
    BranchPoint(usize),
    /// A BPS state of the spectrum (its web is drawn on the canvas).
    State(usize),
}

#[derive(Clone, Debug, PartialEq)]
pub enum Command {
    SetPhase(f64),
    AddZero(Complex64),
    AddPole(Complex64, u32),
    MovePoint(PointRef, Complex64),
    SetPoleOrder(usize, u32),
    DeletePoint(PointRef),
    SetPrefactor([f64; 2]),
    /// Replace the curve by a typed equation (checked first; a bad one
    /// leaves the curve alone and shows the error).
    SetEquation(String),
    SetParam(String, [f64; 2]),
    SetReach(f64),
    /// Rewrite a factored curve as an equation, to edit it as text.
    ConvertToEquation,
    /// The end of a drag or of typing: the next edit opens a new undo step.
    EndInteraction,
    Select(Option<Selection>),
    Undo,
    Redo,
    Open(PathBuf),
    Save,
    SaveAs(PathBuf),
    ExportTo(PathBuf),
    /// The central-charge plane of the spectrum as a figure.
    ExportChargesTo(PathBuf),
    SetTheme(Theme),
    Fit,
    RestoreRecovery,
    DiscardRecovery,
    /// Close the window (Ctrl+Q); unsaved edits go to the recovery file.
    Quit,
}

/// Which edits belong to one undo step: consecutive edits with the same
/// group (a drag, typing, one drag value) make one step.
#[derive(Clone, Debug, PartialEq)]
pub enum EditGroup {
    /// A single edit, always its own step.
    Single,
    Move(PointRef),
    PoleOrder(usize),
    Prefactor,
    Equation,
    Param(String),
    Reach,
}

impl Command {
    /// `Some` for commands that change the curve or its settings.
    pub fn edit_group(&self) -> Option<EditGroup> {
        Some(match self {
            Self::AddZero(_)
            | Self::AddPole(..)
            | Self::DeletePoint(_)
            | Self::ConvertToEquation => EditGroup::Single,
            Self::SetPoleOrder(i, _) => EditGroup::PoleOrder(*i),
            Self::MovePoint(p, _) => EditGroup::Move(*p),
            Self::SetPrefactor(_) => EditGroup::Prefactor,
            Self::SetEquation(_) => EditGroup::Equation,
            Self::SetParam(name, _) => EditGroup::Param(name.clone()),
            Self::SetReach(_) => EditGroup::Reach,
            _ => return None,
        })
    }
}
