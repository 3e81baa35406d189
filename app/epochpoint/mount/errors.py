"""What can go wrong between us and a mount, each with a one-line message.

The command line maps each kind to its own exit status, and a GUI worker can catch
`MountError` alone and show `str(error)`:

- `InterlockRefused`: the site's interlocks forbid the pointing; nothing was sent (exit 3).
- `ConnectionLost`: the INDI server cannot be reached or went away (exit 4). Never retried:
  a client that reconnects by itself could resume motion nobody is watching.
- `MountFailed`: the device refused or failed the command (Alert), did not end in time,
  ended beyond the tolerance, or has no usable telescope (exit 5).
- `IndiTimeout` (a `MountFailed`): the device did not answer within the time allowed.
"""
from __future__ import annotations


def _one_line(text) -> str:
    return " ".join(str(text).split())


class MountError(Exception):
    """Base of every mount-control error; str() is a single line."""

    def __init__(self, message: str):
        self.message = _one_line(message)
        super().__init__(self.message)


class InterlockRefused(MountError):
    """A pointing the site's interlocks forbid; carries the target's name and the reason."""

    def __init__(self, target: str, reason: str):
        self.target, self.reason = target, reason
        super().__init__(f"refused to point at {target}: {reason}; nothing was sent to the mount")


class ConnectionLost(MountError):
    """The INDI server could not be reached, or the connection to it ended."""


class MountFailed(MountError):
    """The device failed, refused or did not finish a command."""


class IndiTimeout(MountFailed):
    """The device did not answer within the time allowed."""
