//! Long work off the UI thread (reading a large survey, running a survey, refitting the
//! reflector): progress, cancel, and a result picked up by the frame that finds it ready.

use std::path::PathBuf;
use std::sync::atomic::{AtomicBool, AtomicU32, Ordering};
use std::sync::mpsc::{channel, Receiver};
use std::sync::Arc;
use survey::SurveyFile;

pub enum JobOutcome {
    /// Boxed: a survey file is far larger than the other outcomes.
    Survey {
        survey: Box<SurveyFile>,
        path: Option<PathBuf>,
    },
    Failed(String),
    Cancelled,
}

/// Handed to the work: report progress (0..1) and check for cancellation.
#[derive(Clone)]
pub struct JobControl {
    progress: Arc<AtomicU32>,
    cancel: Arc<AtomicBool>,
    ctx: egui::Context,
}

impl JobControl {
    pub fn set_progress(&self, fraction: f32) {
        self.progress
            .store(fraction.clamp(0.0, 1.0).to_bits(), Ordering::Relaxed);
        self.ctx.request_repaint();
    }

    pub fn cancelled(&self) -> bool {
        self.cancel.load(Ordering::Relaxed)
    }

    pub fn cancel_flag(&self) -> Arc<AtomicBool> {
        self.cancel.clone()
    }
}

pub struct Job {
    pub title: String,
    control: JobControl,
    rx: Receiver<JobOutcome>,
}

impl Job {
    pub fn spawn(
        title: impl Into<String>,
        ctx: &egui::Context,
        work: impl FnOnce(&JobControl) -> JobOutcome + Send + 'static,
    ) -> Job {
        let control = JobControl {
            progress: Arc::new(AtomicU32::new(0)),
            cancel: Arc::new(AtomicBool::new(false)),
            ctx: ctx.clone(),
        };
        let (tx, rx) = channel();
        let c2 = control.clone();
        std::thread::spawn(move || {
            let out = work(&c2);
            let _ = tx.send(out);
            c2.ctx.request_repaint();
        });
        Job {
            title: title.into(),
            control,
            rx,
        }
    }

    pub fn progress(&self) -> f32 {
        f32::from_bits(self.control.progress.load(Ordering::Relaxed))
    }

    pub fn cancel(&self) {
        self.control.cancel.store(true, Ordering::Relaxed);
    }

    pub fn try_finish(&self) -> Option<JobOutcome> {
        self.rx.try_recv().ok()
    }

    /// Block until the work ends (tests and scripted start-up only).
    pub fn wait(self) -> JobOutcome {
        self.rx.recv().unwrap_or(JobOutcome::Failed(
            "the worker stopped without an answer".into(),
        ))
    }
}

/// How the workbench runs a survey on a DEM: supplied by the binary (which wires in the survey
/// library's run), so the GUI holds no survey logic. Reports progress and honours cancel
/// through the [`JobControl`].
pub type SurveyRunner = Arc<
    dyn Fn(
            &std::path::Path,
            &crate::survey_settings::SurveySettings,
            &JobControl,
        ) -> Result<SurveyFile, String>
        + Send
        + Sync,
>;

/// Run a survey on a DEM in the background with the chosen settings.
pub fn run_survey(
    runner: SurveyRunner,
    dem_path: PathBuf,
    settings: crate::survey_settings::SurveySettings,
    ctx: &egui::Context,
) -> Job {
    let title = format!(
        "Surveying {}",
        dem_path
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default()
    );
    Job::spawn(title, ctx, move |ctl| {
        match runner(&dem_path, &settings, ctl) {
            _ if ctl.cancelled() => JobOutcome::Cancelled,
            Ok(survey) => JobOutcome::Survey {
                survey: Box::new(survey),
                path: None,
            },
            Err(e) => {
                JobOutcome::Failed(format!("The survey of {} failed: {e}", dem_path.display()))
            }
        }
    })
}

/// Fit another reflector into every candidate of a survey in the background (the survey
/// library's refit, on the survey's DEM). The result comes back as a survey without a path.
pub fn refit_survey(
    survey: Arc<SurveyFile>,
    dem_path: PathBuf,
    spec: structure::StructureSpec,
    ctx: &egui::Context,
) -> Job {
    let title = format!("Refitting {} candidates", survey.candidates.len());
    Job::spawn(title, ctx, move |ctl| {
        let progress = |p: survey::RefitProgress| {
            if p.candidates_total > 0 {
                ctl.set_progress(p.candidates_done as f32 / p.candidates_total as f32);
            }
        };
        let cancel = ctl.cancel_flag();
        match survey::refit(&survey, &dem_path, &spec, &progress, &cancel) {
            Ok(survey) => JobOutcome::Survey {
                survey: Box::new(survey),
                path: None,
            },
            Err(survey::SurveyError::RefitCancelled) => JobOutcome::Cancelled,
            Err(e) => JobOutcome::Failed(format!("The refit failed: {e}")),
        }
    })
}

/// Read a survey file in the background.
pub fn load_survey(path: PathBuf, ctx: &egui::Context) -> Job {
    let title = format!("Reading {}", path.display());
    Job::spawn(title, ctx, move |ctl| {
        ctl.set_progress(0.1);
        let text = match std::fs::read_to_string(&path) {
            Ok(t) => t,
            Err(e) => return JobOutcome::Failed(format!("cannot read {}: {e}", path.display())),
        };
        if ctl.cancelled() {
            return JobOutcome::Cancelled;
        }
        ctl.set_progress(0.5);
        match serde_json::from_str::<SurveyFile>(&text) {
            Ok(survey) => JobOutcome::Survey {
                survey: Box::new(survey),
                path: Some(path),
            },
            Err(e) => JobOutcome::Failed(format!(
                "{} is not a survey file this version reads: {e}",
                path.display()
            )),
        }
    })
}

/// The survey library's run with the chosen settings, as the workbench's survey runner.
pub fn default_survey_runner() -> SurveyRunner {
    Arc::new(
        |dem_path: &std::path::Path,
         settings: &crate::survey_settings::SurveySettings,
         ctl: &JobControl| {
            let progress = |p: survey::run::Progress| {
                if p.tiles_total > 0 {
                    ctl.set_progress(p.tiles_done as f32 / p.tiles_total as f32);
                }
            };
            let cancel = ctl.cancel_flag();
            survey::run::run(dem_path, &settings.run_options(), &progress, &cancel)
                .map(|o| o.survey)
                .map_err(|e| e.to_string())
        },
    )
}
