"""Atomic file writes: a reader sees the old file or the new one, never half of either.

Every output (work-order PDF and HTML, CSV exports, a rewritten spec) goes through here:

- the new content is written to a temporary file in the *same folder* as the target (a rename is
  only atomic within one filesystem), flushed and fsync'ed;
- the temporary file takes the target's permission bits (or the usual ``0o666 & ~umask`` for a new
  file, not the ``0o600`` that :mod:`tempfile` gives);
- ``os.replace`` puts it in place, then the folder is fsync'ed so the rename survives a power cut;
- on any exception the temporary file is removed and the exception re-raised.

A process killed outright (SIGKILL, power loss) cannot clean up after itself: it leaves the old
target untouched plus at most one temporary file per output, named ``.<target name>.<pid>.<random>.tmp``
(see :data:`TEMP_GLOB`). The next write into the same folder removes such leftovers once they are
stale: their writer process is gone and they are older than :data:`STALE_AFTER_S` (the age guards a
writer on another machine sharing the folder). :func:`clean_stale_temps` does it on demand.

Problems of the user's environment (a missing folder, no write permission, a full disk, a
read-only filesystem) become :class:`specgen.errors.SpecError` ``"cannot write: <reason>"`` with
the target as ``file``, so the CLI prints one line and exits 2.

A symbolic link at the target is refused (``cannot write: it is a symbolic link``): writing through
``out/WO-1.pdf -> ~/.bashrc`` would replace a file outside the output folder. The folder itself may
be a link the user chose. File ownership is not carried over (that needs privileges).

``make_folders=True`` creates a missing output folder just before the first byte is written and
removes it again if the write fails, so a refused or failed command leaves no empty folder behind.
"""

from __future__ import annotations

import contextlib
import errno
import os
import tempfile
import time
from collections.abc import Iterator
from pathlib import Path

from specgen.errors import SpecError

#: Shell pattern of the temporary files this module creates (inside the target's folder).
TEMP_GLOB = ".*.tmp"
_TEMP_SUFFIX = ".tmp"
_CHUNK_BYTES = 1 << 20
#: A leftover temporary file whose writer is gone is removed once it is this old (seconds).
STALE_AFTER_S = 60.0

# Test-only: called with the number of bytes written so far after each chunk of ``write_atomic``.
# The SIGKILL-mid-write test sets it to slow a child writer down; production code never sets it.
_chunk_hook = None

#: Test-only: when this environment variable names a file, every atomic write appends its target's
#: path to that file once all its temporary files are written and fsync'ed, then waits, before any
#: rename. tests/test_kill.py kills the command there, the one moment that tells an atomic writer from
#: one that writes in place. Production never sets it.
HOLD_ENV = "SPECGEN_TEST_HOLD_BEFORE_RENAME"

_umask_cache: int | None = None


def _umask() -> int:
    """The process umask, read once (there is no way to read it without briefly setting it)."""
    global _umask_cache
    if _umask_cache is None:
        try:  # Linux exposes it without the set-and-restore race
            with open("/proc/self/status", encoding="ascii") as status:
                for line in status:
                    if line.startswith("Umask:"):
                        _umask_cache = int(line.split()[1], 8)
                        break
        except OSError:
            pass
        if _umask_cache is None:
            current = os.umask(0o022)
            os.umask(current)
            _umask_cache = current
    return _umask_cache


def _target(path: str | os.PathLike) -> Path:
    """The file to replace; a symbolic link there is refused rather than followed."""
    target = Path(path)
    if target.is_symlink():
        raise SpecError("cannot write: it is a symbolic link (remove it, or write to another folder)",
                        file=str(target))
    return target


def _pid_alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:             # exists, but another user's
        return True
    return True


def _is_stale(temp: Path, now: float, older_than_s: float) -> bool:
    """A temporary file of ours whose writer process is gone and which is older than ``older_than_s``."""
    try:
        age = now - temp.stat().st_mtime
    except OSError:
        return False
    if age < older_than_s:
        return False
    parts = temp.name[:-len(_TEMP_SUFFIX)].rsplit(".", 2)
    if len(parts) == 3 and parts[1].isdigit():
        return not _pid_alive(int(parts[1]))
    return age >= 24 * 3600.0    # an older name without its writer's pid: only when a day old


_cleaned_folders: set[str] = set()


def _clean_stale_for(target: Path) -> None:
    """Remove leftovers of earlier killed writes in the target's folder (once per folder and process:
    a batch writing hundreds of orders into one folder scans it once)."""
    key = os.path.abspath(target.parent)
    if key in _cleaned_folders:
        return
    _cleaned_folders.add(key)
    clean_stale_temps(target.parent)


def _make_folders(folder: Path) -> list[Path]:
    """Create ``folder`` and missing parents; returns those created, deepest first."""
    created = []
    probe = folder
    while not probe.exists() and probe != probe.parent:
        created.append(probe)
        probe = probe.parent
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise SpecError(f"cannot create the folder: {err.strerror or err}", file=str(folder)) from None
    return created


def _remove_folders(created: list[Path]) -> None:
    for folder in created:             # deepest first; only if still empty
        with contextlib.suppress(OSError):
            folder.rmdir()


def _hold_before_rename(targets: list[Path]) -> None:
    marker = os.environ.get(HOLD_ENV)
    if not marker:
        return
    with open(marker, "a", encoding="utf-8") as fh:
        fh.write("".join(f"{t}\n" for t in targets))
    time.sleep(300.0)


def _cannot_write(target: Path, err: BaseException) -> SpecError:
    folder = target.parent
    if not folder.is_dir():
        reason = f"folder '{folder}' does not exist"
    elif target.is_dir():
        reason = "it is a folder"
    elif isinstance(err, OSError) and err.errno in (errno.EACCES, errno.EPERM):
        reason = f"no permission to write in '{folder}'"
    elif isinstance(err, OSError) and err.strerror:
        reason = err.strerror[0].lower() + err.strerror[1:]
    else:
        reason = str(err) or type(err).__name__
    return SpecError(f"cannot write: {reason}", file=str(target))


def _new_temp(target: Path) -> Path:
    """Create an empty temporary file beside ``target`` and return its path."""
    _clean_stale_for(target)
    try:
        handle = tempfile.NamedTemporaryFile(dir=target.parent or ".", prefix=f".{target.name}.{os.getpid()}.",
                                             suffix=_TEMP_SUFFIX, delete=False)
    except OSError as err:
        raise _cannot_write(target, err) from err
    handle.close()
    return Path(handle.name)


def _final_mode(target: Path) -> int:
    try:
        return os.stat(target).st_mode & 0o7777
    except FileNotFoundError:
        return 0o666 & ~_umask()


def _fsync_file(path: Path) -> None:
    fd = os.open(path, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def _fsync_folder(folder: Path) -> None:
    """Make the rename durable; not every platform can open a folder, so failure is ignored."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _remove_quietly(path: Path) -> None:
    with contextlib.suppress(OSError):
        os.unlink(path)


def write_atomic(path: str | os.PathLike, data: bytes | str, encoding: str = "utf-8", *,
                 make_folders: bool = False) -> Path:
    """Replace ``path`` with ``data`` atomically; returns the path written.

    ``str`` data is encoded with ``encoding``; text is written as given (no newline translation).
    """
    target = _target(path)
    payload = data.encode(encoding) if isinstance(data, str) else bytes(data)
    created = _make_folders(target.parent) if make_folders else []
    try:
        temp = _new_temp(target)
    except BaseException:
        _remove_folders(created)
        raise
    try:
        try:
            with open(temp, "wb") as out:
                view = memoryview(payload)
                for start in range(0, len(view), _CHUNK_BYTES):
                    out.write(view[start:start + _CHUNK_BYTES])
                    if _chunk_hook is not None:
                        out.flush()
                        _chunk_hook(min(start + _CHUNK_BYTES, len(view)))
                out.flush()
                os.fsync(out.fileno())
            os.chmod(temp, _final_mode(target))
            _hold_before_rename([target])
            os.replace(temp, target)
        except OSError as err:
            raise _cannot_write(target, err) from err
    except BaseException:
        _remove_quietly(temp)
        _remove_folders(created)
        raise
    _fsync_folder(target.parent)
    return target


@contextlib.contextmanager
def atomic_paths(*paths: str | os.PathLike, make_folders: bool = False) -> Iterator[tuple[Path, ...]]:
    """Write several outputs together: yields one temporary path per target, in order.

    The caller writes each temporary path (for example ``html.write_pdf(tmp_pdf)``). When the block
    finishes without an exception every temporary file is fsync'ed, given its final mode, and
    renamed onto its target in the order given. If the block raises, all temporary files are
    removed and no target is touched. Each rename is atomic; the set is not one transaction, but
    renaming starts only after every output was written, so a failed render never replaces any.
    """
    targets = [_target(p) for p in paths]
    temps: list[Path] = []
    created: list[Path] = []
    try:
        if make_folders:
            for folder in dict.fromkeys(t.parent for t in targets):
                created += _make_folders(folder)
        for target in targets:
            temps.append(_new_temp(target))
        yield tuple(temps)
        for target, temp in zip(targets, temps):
            try:
                _fsync_file(temp)
                os.chmod(temp, _final_mode(target))
            except OSError as err:
                raise _cannot_write(target, err) from err
        _hold_before_rename(targets)
        for target, temp in zip(targets, temps):
            try:
                os.replace(temp, target)
            except OSError as err:
                raise _cannot_write(target, err) from err
    except BaseException:
        for temp in temps:
            _remove_quietly(temp)
        _remove_folders(created)
        raise
    for folder in {t.parent for t in targets}:
        _fsync_folder(folder)


def clean_stale_temps(folder: str | os.PathLike, older_than_s: float = STALE_AFTER_S) -> list[Path]:
    """Remove this module's temporary files left in ``folder`` by a killed writer.

    Only files matching :data:`TEMP_GLOB` whose writer process is gone and which were last modified
    more than ``older_than_s`` seconds ago are removed, so a writer still at work keeps its file.
    Returns the paths removed.
    """
    removed = []
    now = time.time()
    for candidate in Path(folder).glob(TEMP_GLOB):
        try:
            if candidate.is_file() and not candidate.is_symlink() and _is_stale(candidate, now, older_than_s):
                candidate.unlink()
                removed.append(candidate)
        except OSError:
            continue
    return removed
