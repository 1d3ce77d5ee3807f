//! Undo and redo as whole-scenario snapshots (scenarios are small).

use super::command::EditGroup;
use crate::scenario::Scenario;

/// Most undo steps kept.
const MAX_STEPS: usize = 200;

#[derive(Default)]
pub struct History {
    undo: Vec<Scenario>,
    redo: Vec<Scenario>,
    open_group: Option<EditGroup>,
}

impl History {
    /// Call before applying an edit of `group` to `current`.
    pub fn before_edit(&mut self, current: &Scenario, group: &EditGroup) {
        if *group != EditGroup::Single && self.open_group.as_ref() == Some(group) {
            return;
        }
        self.undo.push(current.clone());
        if self.undo.len() > MAX_STEPS {
            self.undo.remove(0);
        }
        self.redo.clear();
        self.open_group = (*group != EditGroup::Single).then(|| group.clone());
    }

    /// Ends the current group of edits.
    pub fn close_group(&mut self) {
        self.open_group = None;
    }

    /// The scenario to go back to, given the current one.
    pub fn undo(&mut self, current: &Scenario) -> Option<Scenario> {
        self.open_group = None;
        let prev = self.undo.pop()?;
        self.redo.push(current.clone());
        Some(prev)
    }

    pub fn redo(&mut self, current: &Scenario) -> Option<Scenario> {
        self.open_group = None;
        let next = self.redo.pop()?;
        self.undo.push(current.clone());
        Some(next)
    }

    pub fn can_undo(&self) -> bool {
        !self.undo.is_empty()
    }

    pub fn can_redo(&self) -> bool {
        !self.redo.is_empty()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn with_reach(r: f64) -> Scenario {
        Scenario {
            reach: r,
            ..Scenario::default()
        }
    }

    #[test]
    fn a_drag_is_one_step_and_redo_returns() {
        let mut h = History::default();
        let g = EditGroup::Reach;
        h.before_edit(&with_reach(1.0), &g);
        h.before_edit(&with_reach(2.0), &g);
        h.close_group();
        let back = h.undo(&with_reach(3.0)).unwrap();
        assert_eq!(back.reach, 1.0);
        assert!(!h.can_undo());
        assert_eq!(h.redo(&back).unwrap().reach, 3.0);
    }

    #[test]
    fn singles_are_separate_steps() {
        let mut h = History::default();
        h.before_edit(&with_reach(1.0), &EditGroup::Single);
        h.before_edit(&with_reach(2.0), &EditGroup::Single);
        assert_eq!(h.undo(&with_reach(3.0)).unwrap().reach, 2.0);
        assert_eq!(h.undo(&with_reach(2.0)).unwrap().reach, 1.0);
    }
}
