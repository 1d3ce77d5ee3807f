//! What the UI asks for, and the words it is said in. Panels, the canvas
//! and the inspector read the app's state and return commands; the handler
//! (`handler.rs`) applies them all in one place, which is also where undo
//! snapshots are taken. This module imports nothing else from the window.

use crate::scene::{Theme, View};
use num_complex::Complex64;
use std::path::PathBuf;

/// What a canvas click does.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Tool {
    Select,
    AddBranchPoint,
    AddPuncture,
    /// Clicks add vertices to a path whose ordered jump-matrix product
    /// the inspector shows.
    Path,
}

/// A column the walls table can be sorted by.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum WallSort {
    Index,
    Type,
    Multiplicity,
    Mass,
    End,
}

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
    /// Turn to a phase (radians; wrapped into [0, 2 pi]).
    SetPhase(f64),
    AddZero(Complex64),
    AddPole(Complex64, u32),
    MovePoint(PointRef, Complex64),
    SetPoleOrder(usize, u32),
    DeletePoint(PointRef),
    SetPrefactor([f64; 2]),
    /// The equation field's text: it replaces the curve when it parses; a
    /// bad one leaves the curve alone and shows the error.
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
    // What the window shows and how it reacts; never undone.
    SetTool(Tool),
    SetPlaying(bool),
    SetSpeed(f64),
    SetLooping(bool),
    SetWallLabels(bool),
    /// Pan or zoom the canvas.
    SetView(View),
    /// Pan or zoom the central-charge plane (`None`: fit the states).
    SetChargesView(Option<View>),
    /// Order of the punctures the canvas adds.
    SetNewPoleOrder(u32),
    AddPathVertex(Complex64),
    ClearPath,
    /// Sort the walls table by a column (again: the other way round).
    SortWalls(WallSort),
    /// The file name field of the file bar.
    SetFileField(String),
    SetExportPath(String),
    SetExportSize([u32; 2]),
    SetExportTheme(Theme),
    ShowParamMap(bool),
    SetMapParam(String),
    RecentreMap,
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

/// Parses a script of commands for `WALLFLOWER_SCRIPT` (see [`super::run`]):
/// commands separated by `;` or newlines, each a word and its arguments.
///
/// ```text
/// phase DEGREES | reach R | param NAME RE IM | add-zero RE IM
/// restore-recovery | save-as PATH | quit
/// ```
///
/// A script drives the real window through the same command path as its
/// widgets; the kill -9 recovery test (tests/gui/recovery_kill.rs) uses it
/// to make an edit without synthesising mouse events.
pub fn parse_script(text: &str) -> Result<Vec<Command>, String> {
    let mut out = Vec::new();
    for part in text.split([';', '\n']) {
        let words: Vec<&str> = part.split_whitespace().collect();
        let Some((&name, args)) = words.split_first() else {
            continue;
        };
        let num = |k: usize| -> Result<f64, String> {
            args.get(k)
                .and_then(|s| s.parse::<f64>().ok())
                .filter(|x| x.is_finite())
                .ok_or_else(|| {
                    format!(
                        "script: `{}` wants a number at argument {}",
                        part.trim(),
                        k + 1
                    )
                })
        };
        let arity = |n: usize| -> Result<(), String> {
            (args.len() == n)
                .then_some(())
                .ok_or_else(|| format!("script: `{}` wants {n} argument(s)", part.trim()))
        };
        let cmd = match name {
            "phase" => {
                arity(1)?;
                Command::SetPhase(num(0)?.to_radians())
            }
            "reach" => {
                arity(1)?;
                Command::SetReach(num(0)?)
            }
            "param" => {
                arity(3)?;
                Command::SetParam(args[0].to_string(), [num(1)?, num(2)?])
            }
            "add-zero" => {
                arity(2)?;
                Command::AddZero(Complex64::new(num(0)?, num(1)?))
            }
            "restore-recovery" => {
                arity(0)?;
                Command::RestoreRecovery
            }
            "save-as" => {
                arity(1)?;
                Command::SaveAs(PathBuf::from(args[0]))
            }
            "quit" => {
                arity(0)?;
                Command::Quit
            }
            other => return Err(format!("script: unknown command `{other}`")),
        };
        out.push(cmd);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn scripts_parse_into_commands() {
        let cmds =
            parse_script("phase 90; param u 0.5 -1\nreach 7 ; save-as /tmp/x.ron;quit").unwrap();
        assert_eq!(
            cmds,
            vec![
                Command::SetPhase(std::f64::consts::FRAC_PI_2),
                Command::SetParam("u".into(), [0.5, -1.0]),
                Command::SetReach(7.0),
                Command::SaveAs(PathBuf::from("/tmp/x.ron")),
                Command::Quit,
            ]
        );
        for bad in ["phase", "phase x", "reach 1 2", "jump 3", "phase inf"] {
            assert!(parse_script(bad).is_err(), "{bad}");
        }
    }
}
