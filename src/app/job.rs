//! One background computation kept in step with its input: the worker
//! thread, the generation counter that tells stale answers from fresh ones,
//! the cancel token of the running request (inside the worker), the newest
//! result, and whether that result belongs to the current input. The
//! network and the spectrum are both a `Job`, and so is the parameter
//! map's scan, whose points arrive as partial results.

use super::worker::{ComputeFn, Message, Worker};
use crate::scenario::Scenario;
use eframe::egui;
use std::sync::Arc;

/// A finished answer, as shown.
pub struct Done<T> {
    pub generation: u64,
    pub value: Arc<T>,
    pub compute_ms: f64,
}

/// What a poll brought in.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Polled {
    Nothing,
    Value,
    Error,
}

pub struct Job<T, I = Scenario, P = ()> {
    worker: Worker<T, I, P>,
    /// Generation of the newest request sent.
    generation: u64,
    /// Generation of the newest answer received (value or error).
    received: u64,
    /// The input of the newest request sent.
    submitted: Option<I>,
    /// The newest value; it stays shown when a later request fails.
    pub latest: Option<Done<T>>,
    /// Why the newest answer is not a value.
    pub error: Option<String>,
    /// Engine time of the newest answer (value or error), in ms.
    pub last_ms: f64,
}

impl<T, I, P> Job<T, I, P>
where
    T: Send + Sync + 'static,
    I: Clone + PartialEq + Send + 'static,
    P: Send + 'static,
{
    /// A job whose worker thread is called `name`.
    pub fn new(name: &str, compute: ComputeFn<I, T, P>) -> Self {
        Self {
            worker: Worker::spawn(name, compute),
            generation: 0,
            received: 0,
            submitted: None,
            latest: None,
            error: None,
            last_ms: 0.0,
        }
    }

    /// The context the worker wakes when an answer is ready.
    pub fn set_context(&self, ctx: &egui::Context) {
        self.worker.set_context(ctx);
    }

    /// The newest value.
    pub fn value(&self) -> Option<&Arc<T>> {
        self.latest.as_ref().map(|d| &d.value)
    }

    /// A request is out and not answered yet.
    pub fn in_flight(&self) -> bool {
        self.received < self.generation
    }

    /// `input` has been sent (it may still be running).
    pub fn has_submitted(&self, input: &I) -> bool {
        self.submitted.as_ref() == Some(input)
    }

    /// The newest answer is not (yet) the answer for `input`.
    pub fn is_stale(&self, input: &I) -> bool {
        self.in_flight() || !self.has_submitted(input)
    }

    /// Sends `input`; with `cancel_running` the request being computed is
    /// told to stop, since its answer is no longer wanted.
    pub fn submit(&mut self, input: I, cancel_running: bool) {
        self.generation += 1;
        self.worker
            .submit(self.generation, input.clone(), cancel_running);
        self.submitted = Some(input);
    }

    /// Takes in the answers that arrived; older generations than one
    /// already received are dropped.
    pub fn poll(&mut self) -> Polled {
        self.poll_with(|_| {})
    }

    /// [`Self::poll`], handing the partial results of the newest request
    /// to `progress` (those of older requests are dropped).
    pub fn poll_with(&mut self, mut progress: impl FnMut(P)) -> Polled {
        let mut out = Polled::Nothing;
        for message in self.worker.poll() {
            let r = match message {
                Message::Progress(generation, p) => {
                    if generation == self.generation {
                        progress(p);
                    }
                    continue;
                }
                Message::Done(r) => r,
            };
            if r.generation < self.received {
                continue;
            }
            self.received = r.generation;
            self.last_ms = r.compute_ms;
            match r.outcome {
                Ok(value) => {
                    self.latest = Some(Done {
                        generation: r.generation,
                        value,
                        compute_ms: r.compute_ms,
                    });
                    self.error = None;
                    out = Polled::Value;
                }
                Err(e) => {
                    self.error = Some(e);
                    out = Polled::Error;
                }
            }
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::app::worker::ProgressFn;
    use crate::cancel::CancelToken;
    use std::time::{Duration, Instant};

    fn square(x: &i64, _: &CancelToken, _: ProgressFn<'_, ()>) -> Result<Arc<i64>, String> {
        if *x < 0 {
            return Err(format!("{x} is negative"));
        }
        Ok(Arc::new(x * x))
    }

    /// Counts up to `n`, sending each number on the way.
    fn count(n: &u32, _: &CancelToken, progress: ProgressFn<'_, u32>) -> Result<Arc<u32>, String> {
        for k in 1..=*n {
            progress(k);
        }
        Ok(Arc::new(*n))
    }

    #[test]
    fn partial_results_of_the_newest_request_arrive_in_order() {
        let mut job: Job<u32, u32, u32> = Job::new("test-count", count);
        job.submit(4, true);
        let mut seen = Vec::new();
        let start = Instant::now();
        while job.poll_with(|k| seen.push(k)) != Polled::Value {
            assert!(start.elapsed() < Duration::from_secs(10), "no answer");
            std::thread::sleep(Duration::from_millis(1));
        }
        assert_eq!(seen, vec![1, 2, 3, 4]);
        assert_eq!(job.value().map(|v| **v), Some(4));
    }

    fn wait(job: &mut Job<i64, i64>) -> Polled {
        let start = Instant::now();
        loop {
            let p = job.poll();
            if p != Polled::Nothing && !job.in_flight() {
                return p;
            }
            assert!(start.elapsed() < Duration::from_secs(10), "no answer");
            std::thread::sleep(Duration::from_millis(1));
        }
    }

    #[test]
    fn a_job_is_stale_until_its_input_is_answered() {
        let mut job: Job<i64, i64> = Job::new("test-square", square);
        assert!(job.is_stale(&3));
        job.submit(3, true);
        assert!(job.is_stale(&3), "sent but not answered");
        assert_eq!(wait(&mut job), Polled::Value);
        assert!(!job.is_stale(&3));
        assert!(job.is_stale(&4), "another input is not answered");
        assert_eq!(job.value().map(|v| **v), Some(9));
    }

    #[test]
    fn an_error_keeps_the_last_value() {
        let mut job: Job<i64, i64> = Job::new("test-square", square);
        job.submit(5, true);
        wait(&mut job);
        job.submit(-1, true);
        assert_eq!(wait(&mut job), Polled::Error);
        assert_eq!(job.error.as_deref(), Some("-1 is negative"));
        assert_eq!(job.value().map(|v| **v), Some(25));
        assert!(!job.is_stale(&-1));
    }
}
