//! The passes that reshape a finished network (channel energy, then junctions; `run.rs`), a
//! sweep or part of a sweep at a time: a caller (the page) runs a bounded part per call, shows
//! progress between calls and may stop at any call. Run to the end, `finish` gives the very
//! `RunView` that `RunView::new` gives; stopped after `k` whole sweeps of a pass (a sweep
//! stopped midway is taken back), it gives the view of the parameters `finish` returns (that
//! pass asked for `k` sweeps, later reshaping passes off).

use crate::channel_energy::{apply_parents, EnergyDescent};
use crate::junctions::JunctionRelaxing;
use crate::network::{Network, TopologyError, NO_PARENT};
use crate::params::Params;
use crate::run::{topology_pass, Reshaped, RunView};

/// Which reshaping pass a progress report is about.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ReshapePass {
    /// Channel energy optimisation (`energy_sweeps`): `E = sum Q^0.5 L`.
    Energy,
    /// Junction relaxation (`relax_junctions`): `sum q^alpha L`.
    Junctions,
    /// Nothing left to sweep.
    Done,
}

impl ReshapePass {
    /// `energy`, `junctions` or `done`.
    pub fn name(self) -> &'static str {
        match self {
            ReshapePass::Energy => "energy",
            ReshapePass::Junctions => "junctions",
            ReshapePass::Done => "done",
        }
    }
}

/// Where the reshaping stands after a call.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ReshapeProgress {
    /// The pass the figures are about (the one just swept, or the next when none was).
    pub pass: ReshapePass,
    /// Whole sweeps of that pass so far.
    pub sweep: u32,
    /// Sweeps asked of that pass (it may end earlier, once a sweep changes nothing).
    pub sweeps: u32,
    /// The pass's sum before its first sweep (`E` for energy, `sum q^alpha L` for junctions).
    pub before: f64,
    /// The sum after the last whole sweep.
    pub now: f64,
    /// Nodes re-pointed (energy) or junctions moved in the last whole sweep.
    pub moved: usize,
    /// Whether the call that gave this progress ended a sweep (`moved` is that sweep's).
    pub swept: bool,
    /// Nodes (energy) or junctions taken so far by the sweep in progress, 0 between sweeps.
    pub part: usize,
    /// Nodes or junctions a whole sweep of that pass takes.
    pub part_of: usize,
    /// Nodes re-pointed or junctions moved so far by the sweep in progress.
    pub part_moved: usize,
    /// Whether every reshaping sweep has run (or the run was stopped).
    pub done: bool,
}

/// The passes in progress.
enum Stage {
    Energy(EnergyDescent),
    Junctions(JunctionRelaxing),
    Done,
}

/// A finished network being reshaped, a sweep at a time.
pub struct Reshaping {
    params: Params,
    reshaped: Reshaped,
    stage: Stage,
    last: ReshapeProgress,
}

impl Reshaping {
    /// Starts reshaping a grown `network` with the run's `params`; fails only when the network
    /// is not valid (`Network::check`).
    pub fn new(network: Network, params: &Params) -> Result<Reshaping, TopologyError> {
        let forest = topology_pass(&network)?;
        let mut reshaping = Reshaping {
            params: params.clone(),
            reshaped: Reshaped {
                network,
                forest,
                energy: None,
                relaxation: None,
            },
            stage: Stage::Done,
            last: ReshapeProgress {
                pass: ReshapePass::Done,
                sweep: 0,
                sweeps: 0,
                before: 0.0,
                now: 0.0,
                moved: 0,
                swept: false,
                part: 0,
                part_of: 0,
                part_moved: 0,
                done: true,
            },
        };
        reshaping.stage = reshaping.energy_stage();
        if matches!(reshaping.stage, Stage::Done) {
            reshaping.stage = reshaping.junction_stage();
        }
        reshaping.last = reshaping.progress_now(None);
        Ok(reshaping)
    }

    /// The channel energy stage, as `run::energy_pass` runs it (`Done` when it does not run).
    fn energy_stage(&mut self) -> Stage {
        let sweeps = self.params.run.energy_sweeps;
        match self.reshaped.forest.as_ref().filter(|_| sweeps > 0) {
            Some(view) => {
                let reach = self
                    .params
                    .run
                    .energy_reach
                    .unwrap_or(self.params.run.radius)
                    * self.reshaped.network.cell_size;
                Stage::Energy(EnergyDescent::new(
                    &self.reshaped.network,
                    &view.topology,
                    reach,
                    sweeps,
                ))
            }
            None => Stage::Done,
        }
    }

    /// The junction stage, as `run::junction_pass` runs it (`Done` when it does not run).
    fn junction_stage(&mut self) -> Stage {
        let sweeps = self.params.run.relax_junctions;
        match self.reshaped.forest.as_ref().filter(|_| sweeps > 0) {
            Some(view) => Stage::Junctions(JunctionRelaxing::new(
                &self.reshaped.network,
                &view.topology,
                self.params.costs.alpha,
                sweeps,
            )),
            None => Stage::Done,
        }
    }

    /// Where the reshaping stands (after the last call).
    pub fn progress(&self) -> ReshapeProgress {
        self.last
    }

    /// Whether every sweep has run (or the reshaping was stopped).
    pub fn done(&self) -> bool {
        matches!(self.stage, Stage::Done)
    }

    /// Runs one sweep of the pass in progress, or the rest of a part-run one (ending the pass
    /// when that was its last sweep, and starting the next pass's first sweep only on the next
    /// call); fails only when the re-pointed network's forest view cannot be derived, which
    /// `energy_pass` would fail on too.
    pub fn sweep(&mut self) -> Result<ReshapeProgress, TopologyError> {
        self.advance(usize::MAX)
    }

    /// Takes up to `items` more nodes (energy) or junctions of the sweep in progress, as
    /// `sweep` does for a whole one: any split of the sweeps into parts gives the same network,
    /// bit for bit.
    pub fn advance(&mut self, items: usize) -> Result<ReshapeProgress, TopologyError> {
        let ended = match &mut self.stage {
            Stage::Energy(descent) => {
                let ended = descent
                    .advance(&self.reshaped.network, items)
                    .map(|sweep| sweep.moves);
                if descent.done() {
                    self.end_energy()?;
                    self.stage = self.junction_stage();
                }
                ended
            }
            Stage::Junctions(relaxing) => {
                let before = relaxing.report().moves;
                let forest = self.reshaped.forest.as_ref();
                let ended = match forest {
                    Some(view) => relaxing
                        .advance(&mut self.reshaped.network, &view.topology, items)
                        .map(|_| relaxing.report().moves - before),
                    None => Some(0),
                };
                if relaxing.done() || forest.is_none() {
                    self.end_junctions();
                }
                ended
            }
            Stage::Done => Some(0),
        };
        self.last = self.progress_now(ended);
        Ok(self.last)
    }

    /// Stops: a sweep stopped midway is taken back, so the pass in progress keeps its whole
    /// sweeps (its sweep count in the returned parameters becomes that); later passes do not
    /// run.
    pub fn stop(&mut self) -> Result<ReshapeProgress, TopologyError> {
        match &mut self.stage {
            Stage::Energy(descent) => {
                descent.take_back_part();
                let ran = descent.report().sweeps.len() as u32;
                self.params.run.energy_sweeps = ran;
                self.params.run.relax_junctions = 0;
                if ran > 0 {
                    self.end_energy()?;
                } else {
                    self.stage = Stage::Done;
                }
            }
            Stage::Junctions(relaxing) => {
                relaxing.take_back_part(&mut self.reshaped.network);
                let ran = relaxing.report().sweeps;
                self.params.run.relax_junctions = ran;
                if ran > 0 {
                    self.end_junctions();
                } else {
                    self.stage = Stage::Done;
                }
            }
            Stage::Done => {}
        }
        self.stage = Stage::Done;
        self.last = self.progress_now(None);
        self.last.done = true;
        Ok(self.last)
    }

    /// Ends the energy stage as `energy_pass` does: writes the new downstream nodes and derives
    /// the forest view again when some node moved.
    fn end_energy(&mut self) -> Result<(), TopologyError> {
        let Stage::Energy(descent) = std::mem::replace(&mut self.stage, Stage::Done) else {
            return Ok(());
        };
        let (parent, report) = descent.into_result();
        if report.moves() > 0 {
            apply_parents(&mut self.reshaped.network, &parent);
            self.reshaped.forest = topology_pass(&self.reshaped.network)?;
        }
        self.reshaped.energy = Some(report);
        Ok(())
    }

    /// Ends the junction stage as `junction_pass` does: the forest view's lengths follow the
    /// moved junctions.
    fn end_junctions(&mut self) {
        let Stage::Junctions(relaxing) = std::mem::replace(&mut self.stage, Stage::Done) else {
            return;
        };
        if let Some(view) = self.reshaped.forest.as_mut() {
            for (node, length) in view.topology.length.iter_mut().enumerate() {
                let parent = view.topology.parent[node];
                if parent != NO_PARENT {
                    *length = self.reshaped.network.segment_length(node as u32, parent);
                }
            }
        }
        self.reshaped.relaxation = Some(relaxing.report());
    }

    /// The progress figures as things stand; `ended` holds the moves of a sweep that ended in
    /// the last call.
    fn progress_now(&self, ended: Option<usize>) -> ReshapeProgress {
        let (part, part_of, part_moved) = match &self.stage {
            Stage::Energy(descent) => descent.part_done(),
            Stage::Junctions(relaxing) => relaxing.part_done(),
            Stage::Done => (0, 0, 0),
        };
        let (pass, sweep, sweeps, before, now) = match &self.stage {
            Stage::Energy(descent) => {
                let report = descent.report();
                (
                    ReshapePass::Energy,
                    report.sweeps.len() as u32,
                    descent.sweeps_asked(),
                    report.energy_before,
                    report.energy_after,
                )
            }
            Stage::Junctions(relaxing) => {
                let report = relaxing.report();
                (
                    ReshapePass::Junctions,
                    report.sweeps,
                    self.params.run.relax_junctions,
                    report.cost_before,
                    report.cost_after,
                )
            }
            Stage::Done => match (&self.reshaped.relaxation, &self.reshaped.energy) {
                (Some(relaxation), _) => (
                    ReshapePass::Junctions,
                    relaxation.sweeps,
                    self.params.run.relax_junctions,
                    relaxation.cost_before,
                    relaxation.cost_after,
                ),
                (None, Some(energy)) => (
                    ReshapePass::Energy,
                    energy.sweeps.len() as u32,
                    self.params.run.energy_sweeps,
                    energy.energy_before,
                    energy.energy_after,
                ),
                (None, None) => (ReshapePass::Done, 0, 0, 0.0, 0.0),
            },
        };
        ReshapeProgress {
            pass,
            sweep,
            sweeps,
            before,
            now,
            moved: ended.unwrap_or(self.last.moved),
            swept: ended.is_some(),
            part,
            part_of,
            part_moved,
            done: self.done(),
        }
    }

    /// What the channel energy pass did so far (`None` before it ended or when it does not
    /// run), for the per-sweep figures.
    pub fn energy(&self) -> Option<&crate::channel_energy::ChannelEnergy> {
        match &self.stage {
            Stage::Energy(descent) => Some(descent.report()),
            _ => self.reshaped.energy.as_ref(),
        }
    }

    /// Runs the passes after reshaping on the network as it stands (every sweep left is run
    /// first unless stopped) and returns the view with the parameters it stands for.
    pub fn finish(self) -> Result<(RunView, Params), TopologyError> {
        let (reshaped, params) = self.into_reshaped()?;
        Ok((RunView::after_reshaping(reshaped, &params), params))
    }

    /// The reshaped network (every sweep left is run first unless stopped) with the parameters
    /// it stands for, for a caller that runs the passes after reshaping itself
    /// (`run::Conducted`, a piece of the loop pass at a time).
    pub fn into_reshaped(mut self) -> Result<(Reshaped, Params), TopologyError> {
        while !self.done() {
            self.sweep()?;
        }
        Ok((self.reshaped, self.params))
    }
}
