//! Work on a background thread: start it, watch its progress, ask it to stop, collect its result.
//!
//! The window must keep drawing while an analysis, a design search, a file dialog or an export
//! runs, so each of them is a [`Job`]. The work is handed owned data and a [`Control`] through
//! which it reports progress (a step number whose meaning the caller chooses) and checks whether it
//! was cancelled. A panic inside the work does not take the window down and does not leave it
//! waiting for ever: it becomes [`JobError::Panicked`], which the window shows in words.

use std::fmt;
use std::panic::{AssertUnwindSafe, catch_unwind};
use std::sync::Arc;
use std::sync::atomic::{AtomicBool, AtomicU32, Ordering};
use std::sync::mpsc::{self, Receiver, TryRecvError};
use std::thread::JoinHandle;

/// Why a job gave no result.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum JobError {
    /// The work stopped with an internal error (a panic); the message is the panic's text.
    #[error("the {job} stopped with an internal error (please report it): {message}")]
    Panicked {
        /// What the job was doing, e.g. "analysis".
        job: String,
        /// The panic message.
        message: String,
    },
    /// The system refused to start another thread.
    #[error("the {job} could not be started: {message}")]
    NotStarted {
        /// What the job was doing.
        job: String,
        /// What the system reported.
        message: String,
    },
    /// The thread ended without sending a result (it cannot, unless the process is going down).
    #[error("the {job} stopped unexpectedly")]
    Lost {
        /// What the job was doing.
        job: String,
    },
}

/// What the work sees of its job: progress to report, a cancel request to honour.
pub struct Control {
    step: Arc<AtomicU32>,
    cancel: Arc<AtomicBool>,
    notify: Box<dyn Fn() + Send>,
}

impl Control {
    /// Reports that the work has reached `step` (the caller's numbering) and wakes the watcher.
    pub fn report(&self, step: u32) {
        self.step.store(step, Ordering::Release);
        (self.notify)();
    }

    /// Whether the watcher asked the work to stop; the work checks between its steps.
    pub fn cancelled(&self) -> bool {
        self.cancel.load(Ordering::Acquire)
    }
}

/// Work of type `T` running on its own thread.
pub struct Job<T> {
    name: String,
    step: Arc<AtomicU32>,
    cancel: Arc<AtomicBool>,
    result: Receiver<Result<T, JobError>>,
    handle: Option<JoinHandle<()>>,
    done: bool,
}

impl<T> fmt::Debug for Job<T> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("Job")
            .field("name", &self.name)
            .field("step", &self.step())
            .field("cancelled", &self.cancel.load(Ordering::Acquire))
            .field("done", &self.done)
            .finish()
    }
}

/// The text of a panic payload (`panic!("...")` gives a `&str` or a `String`).
fn panic_text(payload: &(dyn std::any::Any + Send)) -> String {
    if let Some(s) = payload.downcast_ref::<&str>() {
        (*s).to_string()
    } else if let Some(s) = payload.downcast_ref::<String>() {
        s.clone()
    } else {
        "no message".to_string()
    }
}

impl<T: Send + 'static> Job<T> {
    /// Starts `work` on a new thread named `name` (also the word used in error messages, e.g.
    /// "analysis"). `notify` is called after every progress report and once the result is ready
    /// (the window passes a closure that requests a repaint, so it need not poll in a loop).
    pub fn start<W, N>(name: &str, work: W, notify: N) -> Job<T>
    where
        W: FnOnce(&Control) -> T + Send + 'static,
        N: Fn() + Send + 'static,
    {
        let step = Arc::new(AtomicU32::new(0));
        let cancel = Arc::new(AtomicBool::new(false));
        let (tx, rx) = mpsc::channel();
        let control = Control {
            step: Arc::clone(&step),
            cancel: Arc::clone(&cancel),
            notify: Box::new(notify),
        };
        let job_name = name.to_string();
        let spawned = std::thread::Builder::new()
            .name(name.to_string())
            .spawn(move || {
                // The work owns its data, so nothing it left half-changed is seen after a panic.
                let result = catch_unwind(AssertUnwindSafe(|| work(&control))).map_err(|p| {
                    JobError::Panicked {
                        job: job_name,
                        message: panic_text(p.as_ref()),
                    }
                });
                // The watcher may have dropped the job; then nobody wants the result.
                let _ = tx.send(result);
                (control.notify)();
            });
        let (result, handle) = match spawned {
            Ok(h) => (rx, Some(h)),
            Err(e) => {
                let (tx, rx) = mpsc::channel();
                let _ = tx.send(Err(JobError::NotStarted {
                    job: name.to_string(),
                    message: e.to_string(),
                }));
                (rx, None)
            }
        };
        Job {
            name: name.to_string(),
            step,
            cancel,
            result,
            handle,
            done: false,
        }
    }
}

impl<T> Job<T> {
    /// The last step the work reported (0 before the first report).
    pub fn step(&self) -> u32 {
        self.step.load(Ordering::Acquire)
    }

    /// Asks the work to stop at its next check; the result then says what it did.
    pub fn cancel(&self) {
        self.cancel.store(true, Ordering::Release);
    }

    /// The result once the work has finished (returned once; later calls give `None`).
    pub fn poll(&mut self) -> Option<Result<T, JobError>> {
        if self.done {
            return None;
        }
        match self.result.try_recv() {
            Ok(r) => {
                self.done = true;
                if let Some(h) = self.handle.take() {
                    // The thread has sent its last message; joining does not wait.
                    let _ = h.join();
                }
                Some(r)
            }
            Err(TryRecvError::Empty) => None,
            Err(TryRecvError::Disconnected) => {
                self.done = true;
                Some(Err(JobError::Lost {
                    job: self.name.clone(),
                }))
            }
        }
    }

    /// Waits for the result (for the command line and tests; the window uses [`Job::poll`]).
    pub fn wait(mut self) -> Result<T, JobError> {
        if self.done {
            return Err(JobError::Lost { job: self.name });
        }
        if let Some(h) = self.handle.take() {
            let _ = h.join();
        }
        self.result
            .recv()
            .unwrap_or(Err(JobError::Lost { job: self.name }))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::sync::atomic::AtomicUsize;
    use std::time::Duration;

    fn poll_until_done<T>(job: &mut Job<T>) -> Result<T, JobError> {
        loop {
            if let Some(r) = job.poll() {
                return r;
            }
            std::thread::sleep(Duration::from_millis(2));
        }
    }

    #[test]
    fn result_is_delivered_once() {
        let mut job = Job::start("sum", |_c: &Control| (1..=10).sum::<u32>(), || {});
        assert_eq!(poll_until_done(&mut job), Ok(55));
        assert!(job.poll().is_none());
    }

    #[test]
    fn progress_is_seen_and_wakes_the_watcher() {
        let wakes = Arc::new(AtomicUsize::new(0));
        let w = Arc::clone(&wakes);
        let (go_tx, go_rx) = mpsc::channel::<()>();
        let (at_tx, at_rx) = mpsc::channel::<()>();
        let mut job = Job::start(
            "steps",
            move |c: &Control| {
                c.report(1);
                at_tx.send(()).unwrap();
                go_rx.recv().unwrap();
                c.report(2);
                "done"
            },
            move || {
                w.fetch_add(1, Ordering::Relaxed);
            },
        );
        at_rx.recv().unwrap();
        assert_eq!(job.step(), 1);
        go_tx.send(()).unwrap();
        assert_eq!(poll_until_done(&mut job), Ok("done"));
        assert_eq!(job.step(), 2);
        // Two reports and the finish.
        assert_eq!(wakes.load(Ordering::Relaxed), 3);
    }

    #[test]
    fn cancel_reaches_the_work() {
        let (go_tx, go_rx) = mpsc::channel::<()>();
        let job = Job::start(
            "cancellable",
            move |c: &Control| {
                // Hold until the test has cancelled, so the order is certain.
                go_rx.recv().unwrap();
                if c.cancelled() { "stopped" } else { "ran" }
            },
            || {},
        );
        job.cancel();
        go_tx.send(()).unwrap();
        assert_eq!(job.wait(), Ok("stopped"));
    }

    #[test]
    fn a_panic_becomes_an_error_in_words() {
        let mut job: Job<u32> = Job::start(
            "analysis",
            |_c: &Control| panic!("index out of bounds in the fit"),
            || {},
        );
        let err = poll_until_done(&mut job).unwrap_err();
        assert!(matches!(err, JobError::Panicked { .. }), "{err:?}");
        let text = err.to_string();
        assert!(
            text.starts_with("the analysis stopped with an internal error"),
            "{text}"
        );
        assert!(text.contains("index out of bounds in the fit"), "{text}");
        // A formatted panic message (a String payload) is kept too.
        let n = 7;
        let job: Job<u32> = Job::start("search", move |_c: &Control| panic!("row {n}"), || {});
        assert!(job.wait().unwrap_err().to_string().ends_with("row 7"));
    }
}
