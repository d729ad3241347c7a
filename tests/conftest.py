"""Fixtures shared by every test folder.

Playwright's sync API runs one event loop per thread: a second ``sync_playwright()`` while
the first is alive fails ("using Playwright Sync API inside the asyncio loop"). So the driver
is started once per session here, and every browser test takes it from this fixture.
"""

import pytest


@pytest.fixture(scope="session")
def playwright_driver():
    """The one Playwright driver of the session (sync API)."""
    sync_api = pytest.importorskip("playwright.sync_api")
    with sync_api.sync_playwright() as pw:
        yield pw
