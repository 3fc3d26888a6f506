"""Shared test helpers."""

from pathlib import Path

import pytest

import joulebook


@pytest.fixture
def call():
    return joulebook.call


def pytest_addoption(parser):
    parser.addoption(
        "--validation-report", default=None, help="write the validation report (markdown) here"
    )


def pytest_sessionfinish(session, exitstatus):
    path = session.config.getoption("--validation-report")
    if path:
        from refcheck import RECORDS, report

        Path(path).write_text(report(RECORDS), encoding="utf-8")


# run by LibreOffice's own Python (it imports uno), never collected by pytest
collect_ignore = ["calc/lo_driver.py"]
