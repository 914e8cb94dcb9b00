"""Console output for the two command entry points (``stillair`` and ``python -m stillair``).

Kept in the engine package only because ``python -m stillair`` runs from it; it imports nothing
but the standard library and is not part of the public API.

Two everyday situations must not end in a traceback:

- a console whose encoding cannot show °C, ² or · (``PYTHONIOENCODING=ascii``, old Windows code
  pages): such characters are written in plain ASCII ("degC", "m2") instead of failing;
- output piped into a reader that stops early (``stillair functions | head``): the command stops
  with one line on stderr and exit status 2;
- Ctrl-C, also while the command is still importing (the package's ``__init__`` installs that
  guard before any import of ours; ``run_command`` hands Ctrl-C back): one line, exit status 2.
"""

from __future__ import annotations

import codecs
import os
import sys

from typing import TYPE_CHECKING, Callable

if TYPE_CHECKING:
    from ._parser import OneLineParser

__all__ = ["EXIT_CANNOT_RUN", "OneLineParser", "UsageError", "ascii_fallback", "run_command", "say", "say_line"]

EXIT_CANNOT_RUN = 2

# How the non-ASCII characters our output uses read in plain ASCII.
_ASCII = {"°": "deg", "²": "2", "³": "3", "·": ".", "—": "-", "–": "-", "−": "-", "Δ": "d",
          "≤": "<=", "≥": ">=", "±": "+/-", "×": "x", "µ": "u", "μ": "u", "θ": "theta",
          "ε": "eps", "β": "beta", "ν": "nu", "α": "alpha", "λ": "lambda", "…": "...",
          "’": "'", "“": '"', "”": '"'}
_HANDLER = "stillair-ascii"


def _to_ascii(error: UnicodeError):
    if not isinstance(error, UnicodeEncodeError):
        raise error
    text = error.object[error.start:error.end]
    return "".join(_ASCII.get(ch, "?") for ch in text), error.end


codecs.register_error(_HANDLER, _to_ascii)


def ascii_fallback() -> None:
    """Let stdout and stderr write what their encoding cannot show in ASCII instead of failing."""
    for stream in (sys.stdout, sys.stderr):
        reconfigure = getattr(stream, "reconfigure", None)
        if reconfigure is not None:
            try:
                reconfigure(errors=_HANDLER)
            except (ValueError, OSError):  # a closed or detached stream: nothing to protect
                pass


def _discard_stdout() -> None:
    """Point stdout at the null device so the interpreter's final flush cannot fail again."""
    try:
        null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(null, sys.stdout.fileno())
    except (OSError, ValueError, AttributeError):
        pass


def say(prog: str, message: str) -> None:
    """One line on stderr: ``prog: message``."""
    say_line(f"{prog}: {message}")


def say_line(message: str) -> None:
    """``message`` as one line on stderr (its white space, new lines too, made single spaces)."""
    try:
        print(" ".join(str(message).split()), file=sys.stderr)
    except (OSError, ValueError):
        pass


class UsageError(Exception):
    """A command line the parser refused; the message names the option and the value."""


def __getattr__(name: str) -> type[OneLineParser]:
    # OneLineParser lives in _parser, so that argparse (~5-10 ms with gettext) is imported by
    # the commands, not by every `import stillair`; read here too, where it was first defined.
    if name == "OneLineParser":
        from ._parser import OneLineParser

        return OneLineParser
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


#: The variables OpenBLAS (numpy's BLAS) takes its thread count from, in its order.
_BLAS_THREAD_VARIABLES = ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS")


def one_blas_thread_for_command() -> None:
    """The ``stillair`` command computes cell by cell and column by column: its matrix products
    are small, and a BLAS thread per core only spins beside them (``stillair calc`` of 19,200
    formulas spent ~0.25 s of CPU in idle OpenBLAS threads, a tenth of its whole run, start-up
    included).  So the command runs one BLAS thread, unless the user set a count of their own
    (``--jobs`` spreads work over processes instead).  Called before numpy is first imported,
    when the library reads the variable; a program that imports stillair keeps its own threads.
    """
    from . import _started_as_command

    if _started_as_command() and not any(os.environ.get(name) for name in _BLAS_THREAD_VARIABLES):
        os.environ["OPENBLAS_NUM_THREADS"] = "1"


def _release_start_guard() -> None:
    """Hand Ctrl-C back to Python (a KeyboardInterrupt) once the command runs; the package's
    ``__init__`` took it over while the command was importing (``_guard_command_start``)."""
    import signal

    from . import _interrupted_while_starting

    try:
        if signal.getsignal(signal.SIGINT) is _interrupted_while_starting:
            signal.signal(signal.SIGINT, signal.default_int_handler)
    except (ValueError, OSError):
        pass


def run_command(prog: str, main: Callable[[], int | None]) -> int:
    """Run ``main`` so that nothing but one line on stderr reaches the user when it fails.

    Returns the exit status: main's own, or 2 when the output was closed early, the user
    interrupted, or something unforeseen went wrong (``STILLAIR_DEBUG=1`` shows the traceback).
    """
    ascii_fallback()
    try:
        _release_start_guard()         # from here a Ctrl-C is a KeyboardInterrupt, handled below
        code = main() or 0
        sys.stdout.flush()
        return code
    except BrokenPipeError:
        _discard_stdout()
        say(prog, "standard output: closed by the reading program before the output was complete "
                  "(broken pipe)")
        return EXIT_CANNOT_RUN
    except KeyboardInterrupt:
        say(prog, "interrupted")
        return EXIT_CANNOT_RUN
    except OSError as error:
        if os.environ.get("STILLAIR_DEBUG"):
            raise
        where = f"{error.filename}: " if error.filename else ""
        say(prog, f"{where}{error.strerror or error}")
        return EXIT_CANNOT_RUN
    except Exception as error:  # the last guard: one line, never a traceback
        if os.environ.get("STILLAIR_DEBUG"):
            raise
        say(prog, f"internal error ({type(error).__name__}: {error}); "
                  "run again with STILLAIR_DEBUG=1 to see where")
        return EXIT_CANNOT_RUN
