"""Shared test helpers."""

import pytest

import joulebook


@pytest.fixture
def call():
    return joulebook.call
