//! A cancellation flag shared between a requester and a long computation.

use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::sync::Arc;

/// Cloned into a computation; the computation polls [`CancelToken::is_cancelled`]
/// inside its loops and stops early with partial results marked as cancelled.
#[derive(Clone, Debug, Default)]
pub struct CancelToken(Arc<Inner>);

#[derive(Debug, Default)]
struct Inner {
    cancelled: AtomicBool,
    polls: AtomicU64,
    /// Cancel at this poll (0: never); see [`CancelToken::cancel_at_poll`].
    trip_at: u64,
}

impl CancelToken {
    pub fn new() -> Self {
        Self::default()
    }

    /// A token that cancels itself when it is polled for the `n`-th time
    /// (n >= 1). Tests use it to cancel a computation at a reproducible
    /// point of its work instead of after a wall-clock delay.
    pub fn cancel_at_poll(n: u64) -> Self {
        Self(Arc::new(Inner {
            trip_at: n,
            ..Inner::default()
        }))
    }

    pub fn cancel(&self) {
        self.0.cancelled.store(true, Ordering::Relaxed);
    }

    pub fn is_cancelled(&self) -> bool {
        let n = self.0.polls.fetch_add(1, Ordering::Relaxed) + 1;
        if n == self.0.trip_at {
            self.cancel();
        }
        self.0.cancelled.load(Ordering::Relaxed)
    }

    /// How many times the token has been polled: the number of places at
    /// which a computation could have stopped.
    pub fn polls(&self) -> u64 {
        self.0.polls.load(Ordering::Relaxed)
    }
}
