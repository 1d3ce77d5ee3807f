//! `wallflower network`: the walls, joints and warnings at one phase, as a
//! table or as the JSON object of the interface contract.

use super::json::NetworkJson;
use super::source::{load, SourceArgs};
use super::{emit, say};
use std::process::ExitCode;
use wallflower::network::WarningKind;
use wallflower::{compute, CancelToken};

pub fn run(args: &SourceArgs, json: bool, csv: bool) -> anyhow::Result<ExitCode> {
    let mut out = String::new();
    let loaded = load(args)?;
    loaded.print_warnings();
    let net = compute(
        &loaded.curve,
        loaded.theta,
        &loaded.settings,
        &CancelToken::new(),
    );
    if json {
        let doc = NetworkJson::new(
            &loaded.scenario.title,
            loaded.curve.rank,
            &net,
            &loaded.warnings,
        );
        emit(&serde_json::to_string(&doc)?)?;
        emit("\n")?;
        return Ok(ExitCode::SUCCESS);
    }
    if csv {
        emit(&network_csv(&net))?;
        return Ok(ExitCode::SUCCESS);
    }
    say!(
        out,
        "{}: rank {}, phase {}, reach {}: {} walls, {} joints",
        loaded.label,
        loaded.curve.rank,
        net.theta,
        net.reach,
        net.walls.len(),
        net.joints.len()
    );
    say!(
        out,
        "{:>5}  {:>4}  {:>5}  {:>10}  {:>7}  end",
        "wall",
        "type",
        "mult",
        "mass",
        "points"
    );
    for (idx, w) in net.walls.iter().enumerate() {
        say!(
            out,
            "{:>5}  {:>4}  {:>5}  {:>10.6}  {:>7}  {}",
            idx + 1,
            w.kind.to_string(),
            w.multiplicity,
            w.mass(),
            w.points.len(),
            w.end
        );
    }
    if !net.joints.is_empty() {
        say!(out, "{:>5}  {:>24}  parents  child", "joint", "z");
        for (idx, j) in net.joints.iter().enumerate() {
            say!(
                out,
                "{:>5}  {:>24}  {:>3} {:>3}  {:>5}",
                idx + 1,
                format!("{:.6}{:+.6}i", j.z.re, j.z.im),
                j.parents[0] + 1,
                j.parents[1] + 1,
                j.child + 1
            );
        }
    }
    // The curve's notes were printed with the loader's warnings.
    for w in net
        .warnings
        .iter()
        .filter(|w| w.kind != WarningKind::CurveNote)
    {
        eprintln!("warning: {}", super::one_line(&w.message));
    }
    emit(&out)?;
    Ok(ExitCode::SUCCESS)
}

/// The walls and the joints as one CSV table: `list` says which a row is,
/// cells that do not apply to it are empty, numbers count from 1.
fn network_csv(net: &wallflower::Network) -> String {
    let mut out = String::from(
        "list,number,type,multiplicity,mass,points,end,re_z,im_z,parent_1,parent_2,child\n",
    );
    for (idx, w) in net.walls.iter().enumerate() {
        say!(
            out,
            "wall,{},{},{},{},{},{},,,,,",
            idx + 1,
            w.kind,
            w.multiplicity,
            w.mass(),
            w.points.len(),
            w.end.code()
        );
    }
    for (idx, j) in net.joints.iter().enumerate() {
        say!(
            out,
            "joint,{},,,,,,{},{},{},{},{}",
            idx + 1,
            j.z.re,
            j.z.im,
            j.parents[0] + 1,
            j.parents[1] + 1,
            j.child + 1
        );
    }
    out
}
