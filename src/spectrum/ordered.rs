//! Items `0..n` computed on helper threads and consumed in order on the
//! calling thread, which computes item 0 and any item no helper has
//! claimed yet itself. The consumer sees exactly the items, in exactly the order, of a
//! one-thread loop; only the wall-clock time depends on the thread count.

use crate::cancel::CancelToken;
use std::panic::{catch_unwind, AssertUnwindSafe};
use std::sync::{Condvar, Mutex, MutexGuard, PoisonError};

/// Stack of a helper thread: the usual main-thread size, so that a helper
/// runs out no sooner than the one-thread search would.
pub(super) const HELPER_STACK: usize = 8 << 20;

enum Slot<T> {
    /// Not claimed, or claimed and not finished.
    Pending,
    Ready(T),
    /// Its helper panicked: the consumer computes it again.
    Lost,
}

struct State<T> {
    /// The first item nobody has claimed.
    next: usize,
    /// The consumer is done: helpers claim nothing more.
    closed: bool,
    slots: Vec<Slot<T>>,
}

struct Shared<T> {
    state: Mutex<State<T>>,
    changed: Condvar,
}

impl<T> Shared<T> {
    fn lock(&self) -> MutexGuard<'_, State<T>> {
        self.state.lock().unwrap_or_else(PoisonError::into_inner)
    }

    /// The next unclaimed item, unless the work is closed or cancelled.
    fn claim(&self, cancel: &CancelToken) -> Option<usize> {
        let mut st = self.lock();
        if st.closed || cancel.is_cancelled() || st.next >= st.slots.len() {
            return None;
        }
        st.next += 1;
        Some(st.next - 1)
    }

    fn put(&self, m: usize, slot: Slot<T>) {
        self.lock().slots[m] = slot;
        self.changed.notify_all();
    }

    /// Item `m`, waiting for the helper computing it, or computed here when
    /// nobody has claimed it (items are taken in order, so then `next == m`).
    fn take(&self, m: usize, compute: impl FnOnce() -> T) -> T {
        let mut st = self.lock();
        loop {
            match std::mem::replace(&mut st.slots[m], Slot::Pending) {
                Slot::Ready(item) => return item,
                Slot::Lost => break,
                Slot::Pending if st.next <= m => {
                    st.next = m + 1;
                    break;
                }
                Slot::Pending => {
                    st = self
                        .changed
                        .wait(st)
                        .unwrap_or_else(PoisonError::into_inner);
                }
            }
        }
        drop(st);
        compute()
    }

    fn close(&self) {
        self.lock().closed = true;
    }
}

/// Closes the work when the consumer leaves, normally or by a panic.
struct Closer<'s, T>(&'s Shared<T>);

impl<T> Drop for Closer<'_, T> {
    fn drop(&mut self) {
        self.0.close();
    }
}

/// Computes `work(ctx, m)` for `m` in `0..n` on up to `threads` threads,
/// each with its own context from `make`, and hands the items to `consume`
/// in order on this thread until it returns false. Item 0 is always
/// computed here (the caller's own next step, helpers work ahead). Helpers stop claiming
/// when the consumer stops or `cancel` fires; items computed ahead and not
/// consumed are dropped. A helper that cannot be started or panics leaves
/// its items to this thread.
pub(super) fn each_in_order<C, T: Send>(
    threads: usize,
    n: usize,
    cancel: &CancelToken,
    make: impl Fn() -> C + Sync,
    work: impl Fn(&C, usize) -> T + Sync,
    mut consume: impl FnMut(usize, T) -> bool,
) {
    let shared = Shared {
        state: Mutex::new(State {
            next: 1,
            closed: false,
            slots: (0..n).map(|_| Slot::Pending).collect(),
        }),
        changed: Condvar::new(),
    };
    let (shared, make, work) = (&shared, &make, &work);
    std::thread::scope(|s| {
        let _closer = Closer(shared);
        for _ in 1..threads.min(n) {
            let helper = move || {
                let ctx = make();
                while let Some(m) = shared.claim(cancel) {
                    match catch_unwind(AssertUnwindSafe(|| work(&ctx, m))) {
                        Ok(item) => shared.put(m, Slot::Ready(item)),
                        Err(_) => {
                            shared.put(m, Slot::Lost);
                            return;
                        }
                    }
                }
            };
            // Not started: this thread computes its share.
            let _ = std::thread::Builder::new()
                .stack_size(HELPER_STACK)
                .spawn_scoped(s, helper);
        }
        let mut own: Option<C> = None;
        for m in 0..n {
            let item = if m == 0 {
                work(own.get_or_insert_with(make), 0)
            } else {
                shared.take(m, || work(own.get_or_insert_with(make), m))
            };
            if !consume(m, item) {
                break;
            }
        }
    });
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Whatever the thread count, the consumer sees 0..n squared in order,
    /// and stopping early stops at the same item.
    #[test]
    fn items_arrive_in_order_for_any_thread_count() {
        for threads in [1, 2, 3, 8] {
            let mut seen = Vec::new();
            each_in_order(
                threads,
                50,
                &CancelToken::new(),
                || 7usize,
                |c, m| m * m + c,
                |m, item| {
                    seen.push((m, item));
                    m < 30
                },
            );
            let expected: Vec<(usize, usize)> = (0..=30).map(|m| (m, m * m + 7)).collect();
            assert_eq!(seen, expected, "threads = {threads}");
        }
    }

    /// A helper's panic on one item does not hang or change the order: the
    /// consumer computes the lost item itself (here without panicking, as
    /// its own context differs).
    #[test]
    fn a_lost_item_is_computed_by_the_consumer() {
        let main = std::thread::current().id();
        let mut seen = Vec::new();
        each_in_order(
            2,
            20,
            &CancelToken::new(),
            || std::thread::current().id() == main,
            |on_main, m| {
                assert!(*on_main || m != 3, "helper fails on item 3");
                m
            },
            |_, item| {
                seen.push(item);
                true
            },
        );
        assert_eq!(seen, (0..20).collect::<Vec<_>>());
    }
}
