"""Faults of a running engine: a worker that is terminated, crashes, busy-loops or is stopped in the
debugger. Each time the page must reject what was pending with a clear EngineError, restart the engine by
itself, say so on the status line, and answer the next request as the CPython core does (tests/compare.py).
The automatic restarts are bounded; past the bound the engine is "failed", with Retry.

The deadlines are shortened through the address (?request-timeout=ms, ?heartbeat=ms, ?max-restarts=n),
the same settings the page reads in normal use with longer defaults. The figures (faults injected,
faults survived) are written to the terminal at the end of the module.
"""

from __future__ import annotations

import time

import pytest
from faults_support import (
    BLOOD_GAS_FIELDS,
    CONVERT,
    SETTLED,
    TRACK,
    WorkerControl,
    engine_url,
    report_figures,
    wait_restarted,
)
from screens_support import answer, fill, same_as_core, wait_report

UNIT = "return document.querySelector('input[name=pressure-unit]:checked').value"
FIGURES = {"injected": 0, "survived": 0, "refused_past_the_bound": 0}


@pytest.fixture(scope="module", autouse=True)
def fault_figures(request):
    yield
    report_figures(
        request,
        f"engine faults: {FIGURES['injected']} injected, {FIGURES['survived']} survived (restarted, next "
        f"answer equal to the CPython core; {FIGURES['refused_past_the_bound']} of them past the restart "
        "bound: failed with Retry, then recovered)",
    )


def survived(browser, restarts: int) -> str:
    """The engine restarted by itself and the next request equals the core's answer."""
    text = wait_restarted(browser, restarts)
    assert text.startswith("Ready"), text
    assert "Restarted" in text and "after a fault" in text, text
    answer(browser, CONVERT, timeout=30)
    assert browser.js("return window.tidewell.engine.restarts") == restarts
    FIGURES["survived"] += 1
    return text


def test_terminated_worker_is_found_by_the_heartbeat_and_replaced(browser, server):
    # terminate() fires no event: the idle heartbeat's probe gets no answer
    browser.get(engine_url(server.url, heartbeat=500, request_timeout=4000))
    browser.wait_engine()
    answer(browser, CONVERT)
    assert browser.js("return window.tidewell.engine.restarts") == 0
    t0 = time.monotonic()
    browser.js("window.tidewell.engine.worker.terminate()")
    FIGURES["injected"] += 1
    # a request made while the new engine starts waits for it instead of failing at once
    state = browser.wait_js(
        "const e = window.tidewell.engine;"
        "while (e.state === 'ready') await new Promise((r) => setTimeout(r, 10));"
        "return [e.state, document.querySelector('#engine-text').textContent];",
        timeout=20,
    )
    noticed = time.monotonic() - t0
    assert state[0] == "loading", state
    assert state[1].startswith("Restarting (the engine stopped"), state
    browser.js(TRACK, CONVERT)
    text = survived(browser, 1)
    print(f"terminated worker noticed after {noticed:.1f} s; status: {text}")
    waited = browser.wait_js(SETTLED)
    assert waited["how"] == "resolved", waited
    same_as_core(waited["value"], CONVERT)
    assert browser.js("return window.tidewell.ready instanceof Promise") is True


def test_terminated_worker_with_a_request_pending_is_found_by_the_deadline(browser, server):
    # no heartbeat: the request's deadline and the probe that follows find the dead worker
    browser.get(engine_url(server.url, heartbeat=0, request_timeout=2000))
    browser.wait_engine()
    browser.js("window.tidewell.engine.worker.terminate()")
    FIGURES["injected"] += 1
    browser.js(TRACK, CONVERT)
    settled = browser.wait_js(SETTLED, timeout=30)
    assert settled["how"] == "rejected" and settled["name"] == "EngineError", settled
    assert settled["message"].startswith(
        "The engine stopped before it answered: the engine stopped answering"
    )
    assert "It is being restarted." in settled["message"]
    # deadline 2 s, then a probe of at most 2 s; a generous margin for a noisy machine
    assert settled["ms"] < 2000 + 2000 + 3000, settled
    survived(browser, 1)


def test_crashed_worker_is_restarted(browser, server):
    browser.allow_console(r"injected engine fault")
    browser.get(engine_url(server.url, heartbeat=0))
    browser.wait_engine()
    control = WorkerControl(browser)
    control.crash("injected engine fault")
    FIGURES["injected"] += 1
    text = survived(browser, 1)
    assert "the engine crashed" in text and "injected engine fault" in text, text


def test_a_hung_request_is_rejected_in_time_and_the_panel_recovers(browser, server):
    # The busy loop begins when the worker's thread takes the DevTools message; on a loaded machine the
    # thread may take the page's request first and answer it. That answer proves the loop had not begun:
    # the page is loaded afresh and the fault injected again (at most 3 times), so the test asserts only on
    # a request that was sent to a hung worker.
    for _attempt in range(3):
        browser.get(engine_url(server.url, "gas", heartbeat=0, request_timeout=4000))
        browser.wait_engine()
        control = WorkerControl(browser)
        control.hang()  # the worker's thread busy-loops: nothing it is sent is ever answered
        browser.js(TRACK, CONVERT)
        fill(browser, "blood_gas", BLOOD_GAS_FIELDS)  # the panel's own request hangs too
        settled = browser.wait_js(SETTLED, timeout=30)
        if settled["how"] == "rejected":
            break
    FIGURES["injected"] += 1
    assert settled["how"] == "rejected" and settled["name"] == "EngineError", settled
    assert "the engine stopped answering" in settled["message"], settled
    assert settled["ms"] < 4000 + 4000 + 4000, settled
    # the panel says what happened (no spinner), then computes by itself once the engine is back
    shown = browser.wait_js(
        "const r = document.querySelector('#p-blood_gas-report');"
        "while (!r.textContent.includes('The engine stopped')) await new Promise((ok) => setTimeout(ok, 20));"
        "return [r.dataset.state, r.dataset.busy || '', r.textContent];",
        timeout=30,
    )
    assert shown[0] == "waiting" and shown[1] == "" and "Your values are kept." in shown[2], shown
    survived(browser, 1)
    assert wait_report(browser, "blood_gas") == "done"
    request = {
        "calc": "blood_gas",
        "options": {"pressure_unit": browser.js(UNIT)},
        "inputs": {"ph": 7.21, "pco2": {"value": 8.6, "unit": "kPa"}, "po2": {"value": 8.4, "unit": "kPa"}},
    }
    shown_summary = browser.js("return document.querySelector('#p-blood_gas-report .summary p').textContent")
    assert shown_summary == answer(browser, request)["summary"][0]


def test_a_worker_stopped_in_the_debugger_is_replaced(browser, server):
    browser.get(engine_url(server.url, heartbeat=0, request_timeout=2000))
    browser.wait_engine()
    control = WorkerControl(browser)
    control.pause()  # the worker stops at the first statement of the next message: this request
    FIGURES["injected"] += 1
    browser.js(TRACK, CONVERT)
    settled = browser.wait_js(SETTLED, timeout=30)
    assert settled["how"] == "rejected" and "the engine stopped answering" in settled["message"], settled
    survived(browser, 1)


def test_restarts_are_bounded_then_retry_recovers(browser, server):
    browser.get(engine_url(server.url, heartbeat=300, request_timeout=2000, max_restarts=1))
    browser.wait_engine()
    browser.js("window.tidewell.engine.worker.terminate()")
    FIGURES["injected"] += 1
    survived(browser, 1)

    browser.js("window.tidewell.engine.worker.terminate()")  # a second fault: past the bound of one
    FIGURES["injected"] += 1
    text = browser.wait_engine_state("failed", timeout=30)
    assert text.startswith("Not working: The engine stopped"), text
    assert "2 times within 5 minutes, so it was not restarted again" in text, text
    assert browser.js("return document.querySelector('#engine-retry').hidden") is False
    refused = browser.wait_js(
        "try { await window.tidewell.compute(arguments[0]); return 'resolved'; }"
        "catch (e) { return [e.name, e.message]; }",
        CONVERT,
    )
    assert refused[0] == "EngineError" and refused[1].startswith("The engine is not available"), refused
    assert browser.js("return window.tidewell.engine.restarts") == 1

    browser.js("document.querySelector('#engine-retry').click()")
    browser.wait_engine_state("ready", timeout=60)
    answer(browser, CONVERT, timeout=30)
    FIGURES["refused_past_the_bound"] += 1
    FIGURES["survived"] += 1
