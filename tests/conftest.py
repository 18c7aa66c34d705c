import json
import os
from pathlib import Path

import pytest
from hypothesis import HealthCheck, settings

ROOT = Path(__file__).resolve().parent.parent
REPORT_SCHEMA = ROOT / "linter" / "data" / "report.schema.json"

# Modest example counts by default (CI: 2 cores, suite under 10 minutes); the slow
# profile is for `pytest -m slow` runs with EVOLINT_HYPOTHESIS=slow.
settings.register_profile("ci", max_examples=40, deadline=None,
                          suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
settings.register_profile("slow", max_examples=600, deadline=None,
                          suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
settings.load_profile(os.environ.get("EVOLINT_HYPOTHESIS", "ci"))


@pytest.fixture(scope="session")
def report_validator():
    from jsonschema import Draft202012Validator

    schema = json.loads(REPORT_SCHEMA.read_text())
    Draft202012Validator.check_schema(schema)
    return Draft202012Validator(schema)


@pytest.fixture
def validate_report(report_validator):
    """Validate a JSON report (dict or text) against the shipped report schema."""

    def check(report):
        data = json.loads(report) if isinstance(report, str) else report
        errors = sorted(report_validator.iter_errors(data), key=lambda e: list(e.path))
        assert not errors, "; ".join(f"{list(e.path)}: {e.message}" for e in errors)
        return data

    return check
