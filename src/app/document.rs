//! The document: what a scenario file saves and undo takes back (curve,
//! parameters, phase, settings, notes), the equation as typed, and the
//! undo history. Edits arrive as commands from the handler.

use super::command::{Command, EditGroup, PointRef, Selection};
use super::history::History;
use crate::algebra::parse::parse_equation;
use crate::scenario::{Pole, Quadratic, Scenario};
use crate::scene::{Theme, View};

pub struct Document {
    pub scenario: Scenario,
    pub history: History,
    /// The equation field's text, which may not parse.
    pub equation_text: String,
    /// Column (1-based) and message of the equation being typed.
    pub equation_error: Option<(usize, String)>,
}

/// What an edit does to the selection.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SelectionAfter {
    Keep,
    Set(Option<Selection>),
}

impl Document {
    pub fn new(scenario: Scenario) -> Self {
        Self {
            equation_text: scenario.curve.clone().unwrap_or_default(),
            equation_error: None,
            history: History::default(),
            scenario,
        }
    }

    /// The part of the scenario the network depends on.
    pub fn network_input(&self) -> Scenario {
        engine_input(&self.scenario)
    }

    /// The part of the scenario the spectrum depends on (not the phase).
    pub fn spectrum_input(&self) -> Scenario {
        Scenario {
            phase: 0.0,
            ..engine_input(&self.scenario)
        }
    }

    /// Applies an edit command (one with an [`Command::edit_group`]),
    /// taking the undo snapshot first, and says what happens to the
    /// selection. `None` when the edit changes nothing (a stale index, a
    /// bad equation): then no snapshot is taken.
    pub fn edit(&mut self, cmd: Command, group: &EditGroup) -> Option<SelectionAfter> {
        if !self.edit_applies(&cmd) {
            return None;
        }
        self.history.before_edit(&self.scenario, group);
        Some(self.apply_edit(cmd))
    }

    /// Checks an edit before its snapshot, so that no-op edits leave no
    /// empty undo steps. A typed equation is parsed here, and its error
    /// kept for the editor.
    fn edit_applies(&mut self, cmd: &Command) -> bool {
        let q = self.scenario.quadratic.as_ref();
        match cmd {
            Command::MovePoint(p, _) | Command::DeletePoint(p) => q.is_some_and(|q| match p {
                PointRef::Zero(i) => *i < q.zeros.len(),
                PointRef::Pole(i) => *i < q.poles.len(),
            }),
            Command::SetPoleOrder(i, _) => q.is_some_and(|q| *i < q.poles.len()),
            Command::AddZero(_) | Command::AddPole(..) | Command::SetPrefactor(_) => q.is_some(),
            Command::ConvertToEquation => q.is_some(),
            Command::SetEquation(text) => {
                self.equation_text.clone_from(text);
                match parse_equation(text) {
                    Ok(_) => {
                        self.equation_error = None;
                        self.scenario.curve.as_deref() != Some(text.as_str())
                            || self.scenario.quadratic.is_some()
                    }
                    Err(e) => {
                        self.equation_error = Some((e.column, e.kind.to_string()));
                        false
                    }
                }
            }
            _ => true,
        }
    }

    fn apply_edit(&mut self, cmd: Command) -> SelectionAfter {
        let sc = &mut self.scenario;
        match cmd {
            Command::AddZero(z) => {
                if let Some(q) = &mut sc.quadratic {
                    q.zeros.push([z.re, z.im]);
                    let new = Selection::Point(PointRef::Zero(q.zeros.len() - 1));
                    return SelectionAfter::Set(Some(new));
                }
            }
            Command::AddPole(z, order) => {
                if let Some(q) = &mut sc.quadratic {
                    q.poles.push(Pole {
                        z: [z.re, z.im],
                        order: order.max(1),
                    });
                    let new = Selection::Point(PointRef::Pole(q.poles.len() - 1));
                    return SelectionAfter::Set(Some(new));
                }
            }
            Command::MovePoint(p, z) => {
                if let Some(q) = &mut sc.quadratic {
                    match p {
                        PointRef::Zero(i) => q.zeros[i] = [z.re, z.im],
                        PointRef::Pole(i) => q.poles[i].z = [z.re, z.im],
                    }
                }
            }
            Command::SetPoleOrder(i, order) => {
                if let Some(q) = &mut sc.quadratic {
                    q.poles[i].order = order.clamp(1, 12);
                }
            }
            Command::DeletePoint(p) => {
                if let Some(q) = &mut sc.quadratic {
                    match p {
                        PointRef::Zero(i) => {
                            q.zeros.remove(i);
                        }
                        PointRef::Pole(i) => {
                            q.poles.remove(i);
                        }
                    }
                    return SelectionAfter::Set(None);
                }
            }
            Command::SetPrefactor(c) => {
                if let Some(q) = &mut sc.quadratic {
                    q.prefactor = c;
                }
            }
            Command::SetEquation(text) => {
                // Parsed in `edit_applies`.
                if let Ok(eq) = parse_equation(&text) {
                    for name in eq.parameter_names() {
                        sc.params.entry(name).or_insert([1.0, 0.0]);
                    }
                    sc.curve = Some(text);
                    sc.quadratic = None;
                    return SelectionAfter::Set(None);
                }
            }
            Command::SetParam(name, v) => {
                sc.params.insert(name, v);
            }
            Command::SetReach(r) => sc.reach = r,
            Command::ConvertToEquation => {
                if let Some(q) = sc.quadratic.take() {
                    let text = quadratic_to_equation(&q);
                    self.equation_text.clone_from(&text);
                    sc.curve = Some(text);
                    return SelectionAfter::Set(None);
                }
            }
            _ => {}
        }
        SelectionAfter::Keep
    }

    /// Goes back one undo step; `false` when there is none.
    pub fn undo(&mut self) -> bool {
        match self.history.undo(&self.scenario) {
            Some(prev) => {
                self.restore(prev);
                true
            }
            None => false,
        }
    }

    pub fn redo(&mut self) -> bool {
        match self.history.redo(&self.scenario) {
            Some(next) => {
                self.restore(next);
                true
            }
            None => false,
        }
    }

    /// Puts back the scenario of a recovery file as one undoable step,
    /// the phase too (it is what was on screen).
    pub fn restore_recovery(&mut self, s: Scenario) {
        self.history.before_edit(&self.scenario, &EditGroup::Single);
        let phase = s.phase;
        self.restore(s);
        self.scenario.phase = phase;
    }

    /// A new document (a file was opened): no undo history.
    pub fn replace(&mut self, s: Scenario) {
        *self = Self::new(s);
    }

    /// Puts a snapshot back; the phase is left where it is (it is a view
    /// of the curve, not an edit of it).
    fn restore(&mut self, mut s: Scenario) {
        s.phase = self.scenario.phase;
        s.view = self.scenario.view.clone();
        self.equation_text = s.curve.clone().unwrap_or_default();
        self.equation_error = None;
        self.scenario = s;
    }
}

/// The part of a scenario the engine reads: a change here means recompute.
pub fn engine_input(s: &Scenario) -> Scenario {
    Scenario {
        title: String::new(),
        view: View::default(),
        theme: Theme::Paper,
        notes: String::new(),
        ..s.clone()
    }
}

/// The part of a scenario that counts as an unsaved change.
pub fn comparable(s: &Scenario) -> Scenario {
    Scenario {
        view: View::default(),
        ..s.clone()
    }
}

fn complex_text(v: [f64; 2]) -> String {
    let (re, im) = (v[0], v[1]);
    if im == 0.0 {
        format!("{re}")
    } else if re == 0.0 {
        format!("{im}*i")
    } else {
        format!("({re}{}{}*i)", if im < 0.0 { "-" } else { "+" }, im.abs())
    }
}

/// `y^2 = c (z - a_1)... / ((z - p_1)^n_1 ...)` in the equation syntax.
pub fn quadratic_to_equation(q: &Quadratic) -> String {
    let factor = |v: [f64; 2]| {
        let (re, im) = (v[0], v[1]);
        let mut s = "z".to_string();
        if re != 0.0 {
            s += &format!(" {} {}", if re < 0.0 { "+" } else { "-" }, re.abs());
        }
        if im != 0.0 {
            s += &format!(" {} {}*i", if im < 0.0 { "+" } else { "-" }, im.abs());
        }
        format!("({s})")
    };
    let mut num = vec![];
    if q.prefactor != [1.0, 0.0] {
        num.push(complex_text(q.prefactor));
    }
    num.extend(q.zeros.iter().map(|z| factor(*z)));
    let num = if num.is_empty() {
        "1".to_string()
    } else {
        num.join("*")
    };
    let den: Vec<String> = q
        .poles
        .iter()
        .map(|p| {
            if p.order == 1 {
                factor(p.z)
            } else {
                format!("{}^{}", factor(p.z), p.order)
            }
        })
        .collect();
    if den.is_empty() {
        format!("y^2 = {num}")
    } else {
        format!("y^2 = {num}/({})", den.join("*"))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_complex::Complex64;

    fn two_zeros() -> Document {
        Document::new(Scenario {
            quadratic: Some(Quadratic {
                prefactor: [1.0, 0.0],
                zeros: vec![[-1.0, 0.0], [1.0, 0.0]],
                poles: vec![],
            }),
            ..Scenario::default()
        })
    }

    #[test]
    fn an_edit_of_a_missing_point_takes_no_undo_step() {
        let mut doc = two_zeros();
        let cmd = Command::MovePoint(PointRef::Zero(5), Complex64::new(0.0, 0.0));
        let group = cmd.edit_group().unwrap();
        assert_eq!(doc.edit(cmd, &group), None);
        assert!(!doc.history.can_undo());
        let cmd = Command::AddZero(Complex64::new(0.0, 1.0));
        let group = cmd.edit_group().unwrap();
        assert_eq!(
            doc.edit(cmd, &group),
            Some(SelectionAfter::Set(Some(Selection::Point(PointRef::Zero(
                2
            )))))
        );
        assert!(doc.undo());
        assert_eq!(doc.scenario.quadratic.as_ref().unwrap().zeros.len(), 2);
    }

    #[test]
    fn a_bad_equation_keeps_the_curve_and_its_text() {
        let mut doc = two_zeros();
        let cmd = Command::SetEquation("y^2 = z +* 1".into());
        assert_eq!(doc.edit(cmd, &EditGroup::Equation), None);
        assert!(doc.scenario.quadratic.is_some());
        assert_eq!(doc.equation_text, "y^2 = z +* 1");
        assert_eq!(doc.equation_error.as_ref().map(|e| e.0), Some(10));
    }

    #[test]
    fn undo_keeps_the_phase() {
        let mut doc = two_zeros();
        doc.edit(Command::SetReach(7.0), &EditGroup::Reach);
        doc.scenario.phase = 1.25;
        assert!(doc.undo());
        assert_eq!(doc.scenario.reach, Scenario::default().reach);
        assert_eq!(doc.scenario.phase, 1.25);
    }
}
