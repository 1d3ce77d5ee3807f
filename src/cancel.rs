//! A cancellation flag shared between a requester and a long computation.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;

/// Cloned into a computation; the computation polls [`CancelToken::is_cancelled`]
/// inside its loops and stops early with partial results marked as cancelled.
#[derive(Clone, Debug, Default)]
pub struct CancelToken(Arc<AtomicBool>);

impl CancelToken {
    pub fn new() -> Self {
        Self::default()
    }

    pub fn cancel(&self) {
        self.0.store(true, Ordering::Relaxed);
    }

    pub fn is_cancelled(&self) -> bool {
        self.0.load(Ordering::Relaxed)
    }
}
