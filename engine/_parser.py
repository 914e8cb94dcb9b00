"""The command line parser of the ``stillair`` commands (apart from :mod:`stillair._console`,
which every ``import stillair`` loads, so that argparse is imported by the commands only)."""

from __future__ import annotations

import argparse

from ._console import UsageError

__all__ = ["OneLineParser"]


class OneLineParser(argparse.ArgumentParser):
    """An argument parser that reports a bad command line in one line, like every other bad
    input, instead of printing the usage text (``--help`` still shows it); the command catches
    :class:`UsageError`, says it and exits 2."""

    def error(self, message: str):
        # argparse words it "argument --rtol: must be ..."; ours reads "--rtol must be ..." as
        # every input check does
        text = message[len("argument "):] if message.startswith("argument ") else message
        text = text.replace(": must be ", " must be ", 1)
        raise UsageError(f"{self.prog}: {text} ({self.prog} --help shows the usage)")
