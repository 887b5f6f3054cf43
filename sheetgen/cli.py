"""Command line: thin. Parses, calls the core, prints, exits.

Exit codes: 0 done; 1 a check found faults (preflight); 2 bad input (one line
on stderr naming the key, option or file and what is allowed; nothing
written); 3 a verification failed inside sheetgen (a bug: please report it);
4 ``build`` wrote the kit but a design check fails (``--allow-failing``: 0);
130 interrupted (Ctrl-C); 143 stopped by SIGTERM (128 + the signal number).
Command modules are imported only when their command runs, so that no command
pays for another's heavy imports.
"""

from __future__ import annotations

import importlib

import click

from sheetgen.version import __version__
from sheetgen.errors import (
    GeometryBug,
    Interrupted,
    SheetgenError,
    interrupt_in_chain,
    interrupt_line,
    stop_on_signal,
)

COMMANDS = {
    "build": "sheetgen.commands.build",
    "parts": "sheetgen.commands.parts",
    "gear": "sheetgen.commands.gear",
    "balance": "sheetgen.commands.balance",
    "nest": "sheetgen.commands.nest",
    "preflight": "sheetgen.commands.preflight",
    "coupon": "sheetgen.commands.coupon",
    "kerf": "sheetgen.commands.kerf",
    "assemble": "sheetgen.commands.assemble",
}

SHORT_HELP = {
    "build": "The whole job: parts, nested sheets in cut order, report and summary.",
    "parts": "Write one kerf-compensated DXF (and SVG) per part, with a manifest.",
    "gear": "Draw one involute gear blank and print its caliper dimensions.",
    "balance": "Mass, balance about the axle, torque and tooth checks.",
    "nest": "Nest kits and extra parts onto sheet stock or a strip.",
    "preflight": "Check any cut file for faults before it goes to the laser.",
    "coupon": "Draw a kerf test piece to cut on your laser.",
    "kerf": "Turn a caliper reading of the test piece into the kerf.",
    "assemble": "Build the kit in 3D (STEP), check interference and clearance.",
}


class _Group(click.Group):
    def list_commands(self, ctx):
        return list(COMMANDS)

    def get_command(self, ctx, name):
        if name not in COMMANDS:
            return None
        return importlib.import_module(COMMANDS[name]).command

    def format_commands(self, ctx, formatter):
        rows = [(name, SHORT_HELP.get(name, "")) for name in COMMANDS]
        with formatter.section("Commands"):
            formatter.write_dl(rows)

    def main(self, args=None, prog_name=None, complete_var=None, standalone_mode=True, **extra):
        """Like click's, but every usage error is one line on stderr, exit code 2;
        an interrupt is one line and exit code 128 + the signal."""
        import signal
        import sys
        import threading

        previous = None
        if threading.current_thread() is threading.main_thread():
            previous = signal.signal(signal.SIGTERM, stop_on_signal)
        try:
            rv = super().main(args=args, prog_name=prog_name, complete_var=complete_var,
                              standalone_mode=False, **extra)
        except Interrupted as exc:
            click.echo(interrupt_line(exc.signum, exc.note), err=True)
            sys.exit(128 + exc.signum)
        except click.UsageError as exc:
            where = exc.ctx.command_path if exc.ctx is not None else "sheetgen"
            click.echo(f"error: {exc.format_message()} (see {where} --help)", err=True)
            sys.exit(2)
        except click.ClickException as exc:
            click.echo(f"error: {exc.format_message()}", err=True)
            sys.exit(exc.exit_code)
        except click.Abort as exc:
            if isinstance(exc.__cause__, KeyboardInterrupt):
                click.echo(interrupt_line(signal.SIGINT), err=True)
                sys.exit(128 + signal.SIGINT)
            click.echo("aborted", err=True)
            sys.exit(1)
        finally:
            if previous is not None:
                signal.signal(signal.SIGTERM, previous)
        sys.exit(rv if isinstance(rv, int) else 0)

    def invoke(self, ctx):
        try:
            return super().invoke(ctx)
        except KeyboardInterrupt:
            raise Interrupted(2) from None  # past click's own handler, which would print a blank line
        except SheetgenError as exc:
            click.echo(f"error: {exc}", err=True)
            ctx.exit(2)
        except OSError as exc:
            # a file fault that no command turned into words: still bad input, one line
            from sheetgen.io.output import os_reason

            where = f"{exc.filename}: " if exc.filename else ""
            click.echo(f"error: {where}{os_reason(exc)}", err=True)
            ctx.exit(2)
        except GeometryBug as exc:
            click.echo(f"internal error: {exc} (a bug in sheetgen {__version__}; nothing was written)", err=True)
            ctx.exit(3)
        except Exception as exc:
            signum = interrupt_in_chain(exc)
            if signum is not None:  # e.g. numpy turns Ctrl-C during its import into ImportError
                raise Interrupted(signum) from None
            if isinstance(exc, (ValueError, ArithmeticError)):
                # user errors are SheetgenError (exit 2); a bare ValueError here is an
                # invariant of ours that failed: one line, exit 3, as for GeometryBug
                click.echo(f"internal error: {exc.__class__.__name__}: {exc} (a bug in sheetgen {__version__}; "
                           f"nothing was written)", err=True)
                ctx.exit(3)
            raise


@click.group(cls=_Group, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="sheetgen")
def main():
    """sheetgen: laser-cut single-axis sun-tracker kits from one parameter file.

    Cautions: never laser-cut PVC, vinyl or other chlorinated plastics; run the
    fume extraction (MDF and acrylic smoke is harmful); never leave a running
    laser unattended. Gears pinch fingers. Secure an outdoor tracker against
    wind; anything larger than a desk kit follows local codes and a licensed
    engineer.
    """


def set_option(f):
    """The repeatable ``--set KEY=VALUE`` option every parameter command takes."""
    return click.option("--set", "overrides", multiple=True, metavar="KEY=VALUE",
                        help="Override a parameter, e.g. --set laser.kerf=0.2 (repeatable).")(f)


def into_existing_option(f):
    """The ``--into-existing`` flag of every command that writes a folder."""
    return click.option("--into-existing", "into_existing", is_flag=True, default=False,
                        help="Write into a folder that holds other files: sheetgen's files are added beside "
                             "them and no file it did not write is replaced or deleted.")(f)
