"""The ``taumatch`` command line.

Each sub-command lives in its own module ``taumatch.cli.cmd_<name>`` that defines a
click command called ``command``; they are discovered here, so adding a command
never touches this file.  Only this package may import click.

A command's module is imported when that command is asked for (``taumatch --help`` imports
them all, for their one-line summaries), and the modules import numpy, scipy, sympy,
matplotlib, pandas and lmfit only inside the functions that use them: ``--help`` and
``--version`` load none of these (tests/test_imports.py holds it).
"""

from __future__ import annotations

import importlib
import os

# BLAS threads for the problem size, before numpy is first imported: the commands' dense
# linear algebra is at most a few hundred unknowns (a ladder's eigenvalues), where a second
# thread costs more in start-up and contention than it gains (bench/bench_chain.py measures
# both).  A value the user set is kept.
for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import click

from .. import __version__
from ..errors import TaumatchError

__all__ = ["main"]


class _Group(click.Group):
    """Turns taumatch's own errors, and those of click's option parser (a missing file, a
    directory, a bad choice, an unknown option), into one line on stderr and the documented
    exit code: 2 for bad input, 1 for a computation that could not succeed.  Finds its
    commands by their modules' names and imports one only when it is asked for."""

    def list_commands(self, ctx):
        return sorted(set(_command_names()) | set(self.commands))

    def get_command(self, ctx, name):
        if name not in self.commands and name in _command_names():
            module = importlib.import_module(f"{__name__}.cmd_{name}")
            self.add_command(module.command, name)
        return self.commands.get(name)

    def make_context(self, info_name, args, parent=None, **extra):
        try:
            return super().make_context(info_name, args, parent=parent, **extra)
        except click.exceptions.NoArgsIsHelpError:
            raise  # bare "taumatch": the help text, as click prints it
        except click.ClickException as exc:
            _usage_line(exc)
            raise click.exceptions.Exit(2) from None

    def invoke(self, ctx):
        try:
            return super().invoke(ctx)
        except TaumatchError as exc:
            from .words import cli_words

            click.echo(f"taumatch: error: {_one_line(cli_words(str(exc)))}", err=True)
            ctx.exit(exc.exit_code)
        except click.exceptions.NoArgsIsHelpError:
            raise
        except click.ClickException as exc:
            _usage_line(exc)
            ctx.exit(2)


def _one_line(text: str) -> str:
    """The message on one line, any quoted value longer than 80 characters cut (an option
    given thirty thousand characters is echoed by its start and its length)."""
    import re

    def cut(m):
        quote, inner = m.group(0)[0], m.group(0)[1:-1]
        return f"{quote}{inner[:76]}…{quote} ({len(inner)} characters)"

    # a quote opens after a space, '=', '(' or the start and closes before a non-word
    # character: the apostrophes of "the divider's ... the capture's" are no quotes
    return re.sub(r"(?<!\w)'[^']{80,}'(?!\w)|(?<!\w)\"[^\"]{80,}\"(?!\w)", cut,
                  " ".join(text.split()))


def _usage_line(exc: click.ClickException) -> None:
    """One line for a parser error, naming the command and where its help is."""
    ctx = getattr(exc, "ctx", None)
    path = ctx.command_path if ctx is not None else "taumatch"
    where = path.split(" ", 1)[1] + ": " if " " in path else ""
    click.echo(f"taumatch: error: {where}{_one_line(exc.format_message())} "
               f"(see '{path} --help')", err=True)


@click.group(cls=_Group, context_settings={"help_option_names": ["-h", "--help"],
                                           "max_content_width": 100})
# the version the package states (tests/test_imports.py holds it equal to the installed
# metadata): reading the metadata would cost more than the rest of the start-up
@click.version_option(version=__version__, package_name="taumatch")
def main():
    """Model the chain between a circuit and an instrument in the s-domain.

    Values are written the way engineers write them: 9M, 11.5p, "120 nH", 1.2m
    (m is milli, M is mega).  Every command takes --json for scripts and --help
    for its own options.
    """


_NAMES: list[str] = []


def _command_names() -> list[str]:
    """The commands, from the ``cmd_<name>`` modules of this package (not imported)."""
    if not _NAMES:
        import pkgutil

        _NAMES.extend(sorted(i.name[4:] for i in pkgutil.iter_modules(__path__)
                             if i.name.startswith("cmd_")))
    return _NAMES
