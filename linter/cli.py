"""The command line: parse options, call the API, render, return an exit status.

Exit statuses: 0 the change keeps the mode; 1 it does not, or a finding is at severity
error; 2 bad input or usage (one line naming file and position); 3 an internal error.
"""
from __future__ import annotations

import sys

import click

from . import __version__
from .errors import InputError
from .model import MODES

OUTPUTS = ("text", "json", "sarif", "markdown", "annotations")
FORMAT_NAMES = ("avro", "protobuf", "jsonschema")
ENCODINGS = ("json",)


def reading_options(command):
    """The options every command that reads schema files takes: --format and -I."""
    command = click.option("-I", "--include", "include", multiple=True, type=click.Path(),
                           help="Add a Protobuf import path (repeatable).")(command)
    return click.option("--format", "format_", type=click.Choice(FORMAT_NAMES),
                        help="Schema language, when the extension does not tell.")(command)


class Failed(Exception):
    """Carries an exit status out of a command without printing a traceback."""

    def __init__(self, status: int):
        self.status = status


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="evolint")
@click.option("--debug", is_flag=True, help="Show the traceback of an internal error.")
@click.pass_context
def cli(ctx, debug):
    """Lint a schema change: is it backward, forward or fully compatible, or breaking?"""
    ctx.ensure_object(dict)["debug"] = debug


@cli.command()
@click.argument("paths", nargs=-1, type=click.Path(), metavar="OLD NEW | [PATHS]...")
@click.option("--mode", type=click.Choice(MODES), default=None,
              help="The compatibility the change must keep.  [default: backward, or the configuration's]")
@reading_options
@click.option("--count-encoding", "encodings", multiple=True, type=click.Choice(ENCODINGS),
              help="Also count this encoding's effect toward the verdict (Protobuf: json, the proto3 "
                   "JSON mapping; the binary encoding always counts). Repeatable.")
@click.option("--output", type=click.Choice(OUTPUTS), default="text", show_default=True,
              help="Report format.")
@click.option("--consumers", type=click.Path(), default=None,
              help="Consumer registry (YAML): say who reads what changed and who must be told.")
@click.option("--witness", is_flag=True,
              help="Show, for each finding that breaks a direction, a datum that demonstrates it "
                   "(confirmed by running the codec).")
@click.option("--base", metavar="REF", default=None,
              help="Compare the working tree with this git revision; PATHS limit the files.")
@click.option("--staged", is_flag=True, help="With git: compare the index (what will be committed), not the working tree.")
@click.option("--config", "config_file", type=click.Path(dir_okay=False),
              help="Configuration file (default: the nearest evolint.toml or pyproject.toml [tool.evolint]).")
def check(paths, mode, format_, include, encodings, output, consumers, witness, base, staged, config_file):
    """Compare OLD with NEW (two files, or two directories paired by relative path).

    With --base REF or --staged: compare the working tree or the index with a git revision.
    """
    from .report import render
    from .runs import run_check

    report = run_check(paths, mode=mode, format=format_, include=include, base=base, staged=staged,
                       config_file=config_file, encodings=encodings or None, consumers=consumers,
                       witness=witness)
    render(output, report, sys.stdout)
    raise Failed(report.exit_code)


@cli.command()
@click.argument("paths", nargs=-1, type=click.Path(), metavar="OLD NEW | [PATHS]...")
@click.option("--consumers", type=click.Path(), default=None,
              help="Consumer registry (YAML) naming who reads which fields.  [default: the configuration's]")
@click.option("--mode", type=click.Choice(MODES), default=None,
              help="The compatibility the change must keep (a consumer's own 'needs' wins).  "
                   "[default: backward, or the configuration's]")
@reading_options
@click.option("--base", metavar="REF", default=None,
              help="Announce the change from this git revision to the working tree; PATHS limit the files.")
@click.option("--staged", is_flag=True, help="With git: announce what is staged, not the working tree.")
@click.option("--config", "config_file", type=click.Path(dir_okay=False),
              help="Configuration file (default: the nearest evolint.toml or pyproject.toml [tool.evolint]).")
@click.option("--output", type=click.Choice(("markdown", "json")), default="markdown", show_default=True,
              help="Markdown to paste, or the same content as JSON.")
@click.option("--witness", is_flag=True,
              help="Add to each breaking change an example datum, confirmed by running the codec.")
def announce(paths, consumers, mode, format_, include, base, staged, config_file, output, witness):
    """Write the announcement of a change: who must be told, and what changes for them."""
    from .announce import render as render_announcement
    from .config import discover
    from .errors import UsageError
    from .runs import run_check

    if not (consumers or discover(config_file, ".").consumers):
        raise UsageError("announce needs a consumer registry: --consumers FILE, or consumers in the configuration")
    report = run_check(paths, mode=mode, format=format_, include=include, base=base, staged=staged,
                       config_file=config_file, consumers=consumers, witness=witness)
    render_announcement(report, sys.stdout, output)
    raise Failed(report.exit_code)


@cli.command()
@click.argument("old", type=click.Path())
@click.argument("new", type=click.Path())
@click.option("--samples", type=click.IntRange(1, 100_000), default=200, show_default=True,
              help="Random data per direction and root type.")
@click.option("--seed", type=int, default=0, show_default=True, help="Seed of the random data.")
@reading_options
@click.option("--output", type=click.Choice(("text", "json")), default="text", show_default=True,
              help="Report format.")
@click.option("--count-encoding", "encodings", multiple=True, type=click.Choice(ENCODINGS),
              help="Also sample this encoding (Protobuf: json, the proto3 JSON mapping). Repeatable.")
def verify(old, new, samples, seed, format_, include, output, encodings):
    """Test the static verdict of OLD -> NEW against the real codecs with random data."""
    from .verify import render as render_verify
    from .verify import verify as run_verify

    report = run_verify(old, new, samples=samples, seed=seed, format=format_, include=include,
                        encodings=encodings, progress=sys.stderr.isatty())
    render_verify(report, output, sys.stdout)
    raise Failed(report.exit_code)


@cli.command()
@click.argument("target", type=click.Path())
@click.option("--git", "use_git", is_flag=True, help="Take the versions from the commits that changed TARGET.")
@click.option("--every-earlier", is_flag=True,
              help="Compare each version with every earlier one, not only its predecessor.")
@click.option("--mode", type=click.Choice(MODES), default=None,
              help="The compatibility each step must keep.  [default: backward, or the configuration's]")
@reading_options
@click.option("--output", type=click.Choice(("text", "json")), default="text", show_default=True)
@click.option("--config", "config_file", type=click.Path(dir_okay=False), help="Configuration file.")
def history(target, use_git, every_earlier, mode, format_, include, output, config_file):
    """Check a schema's history: folders v1/ v2/ ..., files name.1.avsc name.2.avsc ..., or --git."""
    from . import history as hist
    from .config import discover

    result = hist.run(target, use_git=use_git, every_earlier=every_earlier, mode=mode, format=format_,
                      include=include, config=discover(config_file))
    (hist.render_json if output == "json" else hist.render_text)(result, sys.stdout)
    raise Failed(result.exit_code)


@cli.command()
@click.argument("rule_id", required=False)
@click.option("--output", type=click.Choice(("text", "json")), default="text", show_default=True)
def rules(rule_id, output):
    """List the rule catalogue, or explain one rule (by id or name)."""
    from .rulesdoc import explain, listing

    text = explain(rule_id, output) if rule_id else listing(output)
    click.echo(text, nl=not text.endswith("\n"))


def main(argv=None) -> None:
    """Entry point: maps every outcome onto the documented exit statuses."""
    debug = "--debug" in (sys.argv[1:] if argv is None else argv)
    try:
        returned = cli.main(args=argv, prog_name="evolint", standalone_mode=False)
        status = returned if isinstance(returned, int) else 0
    except Failed as exc:
        status = exc.status
    except InputError as exc:
        click.echo(f"evolint: error: {exc}", err=True)
        status = 2
    except RecursionError:
        # Absurdly deep input (nesting or chains of types beyond the interpreter's limit) is bad
        # input, not a crash: refuse it in one line.
        click.echo("evolint: error: the schemas nest types too deeply for evolint to compare; "
                   "flatten the nesting or split the file", err=True)
        status = 2
    except click.exceptions.Abort:
        click.echo("evolint: aborted", err=True)
        status = 2
    except click.ClickException as exc:
        # Usage errors: click's own message, one line, then status 2.
        click.echo(f"evolint: error: {' '.join(exc.format_message().split())}", err=True)
        status = 2
    except click.exceptions.Exit as exc:
        status = exc.exit_code
    except KeyboardInterrupt:
        status = 130
    except BrokenPipeError:
        status = 0
    except Exception as exc:  # noqa: BLE001 - the last line of defence
        if debug:
            import traceback

            traceback.print_exc()
        click.echo(f"evolint: internal error: {type(exc).__name__}: {exc}. This is a bug in evolint; "
                   "please report it with the command you ran (add --debug for the traceback).", err=True)
        status = 3
    sys.exit(status)
