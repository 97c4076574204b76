//! Word of the preparation's stages as they start (reading, repairing,
//! wrapping, coarsening), for a caller that shows progress: a scan of
//! two million facets takes 20-30 s to prepare, which a single "preparing
//! the geometry" line left silent (a review's hatchback). A hook set with
//! [`on_stages`] on a thread hears the stages that thread's preparation
//! reaches, until the returned guard is dropped; without one, nothing is
//! said.

use std::cell::RefCell;

/// What hears the stages.
pub type StageHook = Box<dyn Fn(&str)>;

thread_local! {
    static HOOK: RefCell<Option<StageHook>> = const { RefCell::new(None) };
}

/// Keeps a hook set; dropping it restores the one before.
pub struct StageGuard {
    before: Option<StageHook>,
}

impl Drop for StageGuard {
    fn drop(&mut self) {
        let before = self.before.take();
        HOOK.with(|h| *h.borrow_mut() = before);
    }
}

/// Let `hook` hear the stages this thread's preparation starts, until the
/// guard is dropped.
#[must_use = "the hook is removed when the guard is dropped"]
pub fn on_stages(hook: StageHook) -> StageGuard {
    let before = HOOK.with(|h| h.borrow_mut().replace(hook));
    StageGuard { before }
}

/// Tell the hook, if any, that the stage `what()` starts (built only when
/// someone listens).
pub fn starting(what: impl FnOnce() -> String) {
    HOOK.with(|h| {
        if let Some(hook) = h.borrow().as_ref() {
            hook(&what());
        }
    });
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::rc::Rc;

    /// The hook hears the stages while its guard lives, and only then.
    #[test]
    fn a_hook_hears_stages_while_its_guard_lives() {
        let heard = Rc::new(RefCell::new(Vec::<String>::new()));
        let sink = Rc::clone(&heard);
        {
            let _guard = on_stages(Box::new(move |s| sink.borrow_mut().push(s.to_owned())));
            starting(|| "repairing".into());
        }
        starting(|| "not heard".into());
        assert_eq!(*heard.borrow(), vec!["repairing".to_owned()]);
    }
}
