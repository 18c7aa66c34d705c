from pathlib import Path

from click.testing import CliRunner

from linter import catalogue
from linter.cli import cli
from linter.rulesdoc import markdown

ROOT = Path(__file__).resolve().parent.parent


def test_docs_rules_page_is_generated_from_the_catalogue():
    page = ROOT / "docs" / "rules.md"
    assert page.read_text() == markdown(), "regenerate: python -m linter.rulesdoc > docs/rules.md"


def test_every_rule_has_a_section_in_the_page():
    page = markdown()
    for rule in catalogue.load():
        assert f"### {rule.id}" in page


def test_rules_command_lists_and_explains():
    runner = CliRunner()
    listing = runner.invoke(cli, ["rules"])
    assert listing.exit_code == 0
    for rule in catalogue.load():
        assert rule.id in listing.output
    one = runner.invoke(cli, ["rules", "G001"])
    assert one.exit_code == 0
    for heading in ("What it does", "Why this matters", "Use instead", "Reference"):
        assert heading in one.output


def test_rules_command_unknown_id():
    from linter.errors import UsageError

    result = CliRunner().invoke(cli, ["rules", "Z999"])
    assert isinstance(result.exception, UsageError)
