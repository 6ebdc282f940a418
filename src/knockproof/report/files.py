"""Writing output files safely: to a temporary file beside the target, then renamed into place."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


def write_atomic(path: Path | str, text: str | bytes) -> None:
    """Write ``text`` to ``path`` through a temporary file and an atomic rename."""
    target = Path(path)
    directory = target.parent if str(target.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=directory)
    try:
        data = text.encode("utf-8") if isinstance(text, str) else text
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)  # mkstemp makes 0600; give the file the usual permissions
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
