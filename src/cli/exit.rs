//! The exit codes of every command, in one place.

/// How a command ended (the process exit code is [`Exit::code`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Exit {
    /// 0: done, every figure and point there.
    Done,
    /// 1: bad input or a failure that stopped the command (the message says which).
    Failure,
    /// 2: finished, but some figure or point is missing (the output says which and why).
    Missing,
    /// 3: a sweep stopped before its shard was complete (`--resume` continues it).
    Stopped,
    /// 64: the command line itself is wrong (unknown option, bad value); the usual code for a usage error.
    Usage,
}

impl Exit {
    pub fn code(self) -> u8 {
        match self {
            Exit::Done => 0,
            Exit::Failure => 1,
            Exit::Missing => 2,
            Exit::Stopped => 3,
            Exit::Usage => 64,
        }
    }

    /// The code of a command that failed with `e`: [`Exit::Usage`] when the
    /// error is a [`UsageError`], else [`Exit::Failure`].
    pub fn of_error(e: &anyhow::Error) -> Exit {
        if e.downcast_ref::<UsageError>().is_some() {
            Exit::Usage
        } else {
            Exit::Failure
        }
    }

    /// Done when nothing is missing, else Missing.
    pub fn missing_if(missing: bool) -> Exit {
        if missing {
            Exit::Missing
        } else {
            Exit::Done
        }
    }
}

/// A command-line error found after the arguments parsed (an option this
/// input needs is missing, or the options contradict each other): the
/// command exits 64 like any other usage error. The message names the
/// option, the value and why.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{0}")]
pub struct UsageError(pub String);
