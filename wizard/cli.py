"""The ``relaywright`` command line (typer). Every command is thin: parse, call the study, hand the record on.

Start-up matters: this module imports typer and the standard library only; every heavy import (pint, numpy,
reportlab, questionary, pyhanko) lives inside the command that needs it, so ``relaywright --help`` stays fast.

Exit codes: 0 done; 1 settings produced but a check failed (or a signature/fingerprint did not verify);
2 bad input or usage; 3 (``verify``) the sheet is whole but its signer was not checked (no ``--trust``). Errors
are one line on stderr, never a traceback.
"""

import sys
from pathlib import Path
from typing import Annotated, Optional

import typer

from reports.notices import CAUTION_LINE
from wizard import __version__
from wizard.cli_params import PlainValuesGroup

app = typer.Typer(
    cls=PlainValuesGroup,  # paths, strings and integers read without pydantic (wizard/cli_params.py)
    name="relaywright",
    help="Protection settings for medium-voltage motors and plant generators: from nameplate and system data to "
         "a checked, signed settings sheet.",
    epilog=CAUTION_LINE,
    add_completion=False,
    no_args_is_help=True,
    rich_markup_mode=None,
    pretty_exceptions_enable=False,
)

EXIT_OK, EXIT_CHECK_FAILED, EXIT_BAD_INPUT = 0, 1, 2


def caution(err: bool = False) -> None:
    """The caution every screen that shows settings carries: wrapped at word boundaries on a terminal, one line
    for a pipe. Not printed by ``--version`` nor by ``--help`` of a command: they compute nothing."""
    from wizard.terminal import for_stream

    typer.echo(for_stream(CAUTION_LINE, sys.stderr if err else sys.stdout), err=err)


def _version(value: bool) -> None:
    if value:
        typer.echo(f"relaywright {__version__}")
        raise typer.Exit(EXIT_OK)


@app.callback()
def _root(
    version: Annotated[bool, typer.Option("--version", callback=_version, is_eager=True,
                                          help="Print the version and exit.")] = False,
) -> None:
    """relaywright: settings proposals for motor and generator protection."""


def _study(path: Path):
    """Read, validate and study one machine file: (case, record)."""
    from machines.errors import InputError
    from machines.files import load_case
    from machines.study import run_study

    case, warnings = load_case(path)
    try:
        return case, run_study(case, warnings)
    except InputError as e:  # e.g. an override the study cannot use: say which file it is in
        raise e.at(path) from None


@app.command("settings")
def settings_cmd(
    file: Annotated[Path, typer.Argument(help="Machine file (.toml).")],
    json_out: Annotated[bool, typer.Option("--json", help="Print the settings record as compact JSON (for programs; "
                                                        "`python -m json.tool` indents it).")] = False,
) -> None:
    """Compute the settings for one machine and print them (table or JSON)."""
    _, record = _study(file)
    if json_out:
        typer.echo(record.dumps(indent=None))
        caution(err=True)
    else:
        from reports.console import print_record

        print_record(record, caution=CAUTION_LINE)
    raise typer.Exit(EXIT_CHECK_FAILED if record.worst == "fail" else EXIT_OK)


@app.command("sheet")
def sheet_cmd(
    file: Annotated[Path, typer.Argument(help="Machine file (.toml).")],
    output: Annotated[Optional[Path], typer.Option("-o", "--output", help="PDF to write (default: "
                                                   "<tag>-rev<N>.pdf beside the machine file).")] = None,
    page_size: Annotated[Optional[str], typer.Option("--page-size", help="A4 or letter (default: the file's "
                                                     "sheet.page_size).")] = None,
    sign: Annotated[Optional[Path], typer.Option("--sign", help="PKCS#12 key to sign the PDF with (password "
                                                 "from RELAYWRIGHT_SIGN_PASSWORD, else asked).")] = None,
) -> None:
    """Write the PDF settings sheet for one machine (optionally signed)."""
    from wizard.sheet_command import make_sheet

    code = make_sheet(file, output=output, page_size=page_size, sign=sign)
    caution()
    raise typer.Exit(code)


@app.command("comtrade")
def comtrade_cmd(
    file: Annotated[Path, typer.Argument(help="Machine file (.toml).")],
    output: Annotated[Optional[Path], typer.Option("-o", "--output", help="Folder for the files (default: "
                                                   "<tag>-rev<N>-tests beside the machine file).")] = None,
    force: Annotated[bool, typer.Option("--force", help="Replace files already in the folder.")] = False,
) -> None:
    """Test-set files: a COMTRADE waveform per test point (and the motor's starts and a stall) and test-plan.csv."""
    from wizard.comtrade_command import make_comtrade

    code = make_comtrade(file, output=output, force=force, device=f"relaywright {__version__}")
    caution()
    raise typer.Exit(code)


@app.command("verify")
def verify_cmd(
    pdf: Annotated[Path, typer.Argument(help="Signed settings sheet (.pdf).")],
    machine: Annotated[Optional[Path], typer.Option("--machine", help="Machine file the sheet should match, value "
                                                    "by value.")] = None,
    trust: Annotated[Optional[list[Path]], typer.Option("--trust", help="Certificate of a signer you trust, or of "
                                                        "their issuer (PEM or DER), or a folder of them; "
                                                        "repeatable. Without it the signer is not checked "
                                                        "(exit 3).")] = None,
) -> None:
    """Check that a sheet is whole and who signed it and, with --machine, that it matches the machine file.

    Exit 0: whole, signer trusted (and matching); 1: changed, damaged, not signed, not trusted or not matching;
    3: whole, but no --trust was given to check the signer.
    """
    from reports.signing import verify_command

    code = verify_command(pdf, machine, trust or ())
    caution()
    raise typer.Exit(code)


@app.command("new")
def new_cmd(
    answers: Annotated[Optional[Path], typer.Option("--answers", help="Answer the questions from this (possibly "
                                                    "partial) machine file instead of prompting.")] = None,
    output: Annotated[Optional[Path], typer.Option("-o", "--output", help="Machine file to write.")] = None,
    resume: Annotated[Optional[Path], typer.Option("--resume", help="Continue from a saved draft.")] = None,
    force: Annotated[bool, typer.Option("--force", help="Replace an existing machine file and its sheet (never "
                                        "one of a higher revision).")] = False,
) -> None:
    """Answer questions about a motor or generator and write its machine file and sheet."""
    from wizard.session import run_new

    raise typer.Exit(run_new(answers=answers, output=output, resume=resume, force=force))


@app.command("revise")
def revise_cmd(
    file: Annotated[Path, typer.Argument(help="Machine file to revise.")],
    answers: Annotated[Optional[Path], typer.Option("--answers", help="Take the changed answers from this "
                                                    "partial machine file instead of prompting.")] = None,
) -> None:
    """Ask again with the file's answers as defaults, bump the revision and show what changed."""
    from wizard.session import run_revise

    raise typer.Exit(run_revise(file, answers=answers))


@app.command("batch")
def batch_cmd(
    directory: Annotated[Path, typer.Argument(help="Folder searched recursively for machine files.")],
    output: Annotated[Path, typer.Option("-o", "--output", help="Folder for sheets and records.")],
    workers: Annotated[Optional[int], typer.Option("--workers", min=1, help="Processes (default: CPUs).")] = None,
    force: Annotated[bool, typer.Option("--force", help="Rebuild sheets that are already current.")] = False,
) -> None:
    """Settings, sheet and JSON record for every machine file under a folder."""
    from wizard.batch import run_batch

    code = run_batch(directory, output, workers=workers, force=force)
    caution()
    raise typer.Exit(code)


@app.command("diff")
def diff_cmd(
    old: Annotated[Path, typer.Argument(help="Earlier machine file.")],
    new: Annotated[Path, typer.Argument(help="Later machine file.")],
) -> None:
    """Inputs and settings that changed between two machine files, old → new."""
    from machines.compare import compare
    from reports.changes import format_changes
    from wizard.flow import input_labels
    from wizard.terminal import for_stream

    old_case, old_record = _study(old)
    new_case, new_record = _study(new)
    changes = compare(old_case, old_record, new_case, new_record, labels=input_labels(new_case.machine.kind))
    for line in format_changes(changes):
        typer.echo(for_stream(line, sys.stdout))
    caution()


@app.command("demo")
def demo_cmd(
    directory: Annotated[Path, typer.Argument(help="Folder to write the demo plant into.")] = Path(
        "relaywright-demo"),
) -> None:
    """Write the invented demo plant's machine files and their settings sheets."""
    from wizard.demo_plant import write_demo

    code = write_demo(directory)
    caution()
    raise typer.Exit(code)


def _full_short_help() -> None:
    """The command list of ``--help`` shows each command's first line whole (wrapped), never cut with '...'."""
    for info in app.registered_commands:
        if info.short_help is None and info.callback is not None and info.callback.__doc__:
            info.short_help = info.callback.__doc__.strip().splitlines()[0]


def main() -> None:
    """Entry point: run the app, turning bad input into one line on stderr and exit code 2."""
    from machines.errors import InputError, printable
    from wizard.terminal import for_stream

    _full_short_help()
    try:
        from typer import TyperException as CommandLineError  # typer with its own copy of click
    except ImportError:  # pragma: no cover - typer on the click package
        from click import ClickException as CommandLineError

    try:
        code = app(args=sys.argv[1:] or ["--help"], standalone_mode=False)  # no arguments: the help
    except InputError as e:
        typer.echo(for_stream(f"error: {e}", sys.stderr), err=True)  # one line for scripts, wrapped for people
        sys.exit(EXIT_BAD_INPUT)
    except CommandLineError as e:  # usage: one line, like every other error (the default would print four)
        ctx = getattr(e, "ctx", None)
        where = f" (see '{ctx.command_path} --help')" if ctx is not None else ""
        typer.echo(for_stream(printable(f"error: {e.format_message()}{where}"), sys.stderr), err=True)
        sys.exit(EXIT_BAD_INPUT)
    except (KeyboardInterrupt, typer.Abort):
        typer.echo("interrupted", err=True)
        sys.exit(130)
    except OSError as e:
        where = f"{e.filename}: " if e.filename else ""
        typer.echo(printable(f"error: {where}{e.strerror or e}"), err=True)
        sys.exit(EXIT_BAD_INPUT)
    except Exception as e:  # a bug must still not print a traceback at a practitioner
        first = str(e).splitlines()[0] if str(e) else ""
        typer.echo(printable(f"error: could not complete ({type(e).__name__}: {first}); nothing was written; please "
                             "report this with the input file"), err=True)
        sys.exit(EXIT_BAD_INPUT)
    sys.exit(code if isinstance(code, int) else EXIT_OK)


if __name__ == "__main__":  # pragma: no cover
    main()
