"""The kernel refuses bad widget state from the page (dashboard.guard), in-process.

Messages are handed to a widget's comm handler exactly as ipywidgets 8 receives
them from the browser (``{"content": {"data": {"method": "update", "state": ...,
"buffer_paths": [...]}}, "buffers": [...]}``). A refused value must leave the
widget and the case as they were, send the kernel's value back to the page,
show one short line in the app's alert area and log one warning line: no
exception, no traceback, no server path anywhere.
"""
from __future__ import annotations

import logging
import re

import ipywidgets as widgets
import pytest
from comm.base_comm import CommManager
from convlib.study import evaluate_case

from dashboard import guard
from dashboard.display import Display

BAD_VALUES = ["abc", None, float("nan"), float("inf"), float("-inf"), 1e300, -1.0, 10**400, True, [1] * 100_000,
              [3.0], {"a": 1}, "x" * 200_000]


def update(state, buffer_paths=(), buffers=None) -> dict:
    """A comm message as ipywidgets receives it from the browser."""
    msg = {"content": {"data": {"method": "update", "state": state, "buffer_paths": list(buffer_paths)}}}
    if buffers is not None:
        msg["buffers"] = buffers
    return msg


def nested(depth: int) -> list:
    value = ["deep"]
    for _ in range(depth):
        value = [value]
    return value


def alert_text(app) -> str:
    """What the alert area shows, without its HTML."""
    return re.sub(r"<[^>]+>", " ", app.alert.value).strip()


def q_text(case) -> str:
    return Display("SI").text(abs(float(evaluate_case(case).q_per_length)), "q_per_length")


@pytest.fixture(autouse=True)
def fresh_log_limits(monkeypatch):
    """Each test starts below the guard's log limit (it counts per kernel, i.e. per test session here)."""
    monkeypatch.setattr(guard, "_refusals", 0)
    monkeypatch.setattr(guard, "_unknown_logged", 0)


@pytest.fixture
def sent(monkeypatch):
    """Record what widgets send to the page: ``sent(widget)`` starts recording for it, returns the list."""
    def record(widget):
        # recorded where the widget hands a message to its comm: ipywidgets drops it there when no kernel is
        # registered (as after other in-process tests), which is about the test process, not the guard
        messages = []
        monkeypatch.setattr(widget, "_send", lambda msg, buffers=None: messages.append(msg))
        return messages
    return record


@pytest.fixture
def told():
    """Texts given to an ``on_refused`` callback registered for the test."""
    texts = []

    def callback(widget, text):
        texts.append(text)

    guard.install(on_refused=callback)
    yield texts
    guard.forget(callback)


def assert_clean(caplog, capsys):
    """Nothing was logged with a traceback and nothing printed one."""
    for record in caplog.records:
        assert record.exc_info is None, record.getMessage()
        assert "Traceback" not in record.getMessage()
    out, err = capsys.readouterr()
    assert "Traceback" not in out + err


def assert_short_and_safe(text: str) -> None:
    assert text and len(text) < 200
    assert "Traceback" not in text and "/" not in text and ".py" not in text and "site-packages" not in text


# ---------------------------------------------------------------------------- installation
def test_app_installs_the_guard_once(app):
    assert guard.installed()
    assert widgets.Widget.set_state is guard._guarded_set_state
    wind = app.line.controls["wind_speed"].widget
    assert wind.comm._msg_callback.__func__ is guard._guarded_handle_msg  # the comm uses the guarded handler
    before = len(guard._callbacks)
    guard.install(on_refused=app._show_refusal)
    guard.install()
    assert widgets.Widget.set_state is guard._guarded_set_state and len(guard._callbacks) == before


# ---------------------------------------------------------------------------- the wind-speed slider
@pytest.mark.parametrize("bad", BAD_VALUES, ids=lambda v: repr(v)[:24])
def test_wind_slider_refuses_bad_value_and_keeps_working(app, study, sent, caplog, capsys, bad):
    wind = app.line.controls["wind_speed"].widget
    case, card = app.line.case, app.line.card_text("q_per_length")
    value = wind.value
    messages = sent(wind)
    with caplog.at_level(logging.WARNING):
        wind._handle_msg(update({"value": bad}))  # must not raise
    assert wind.value == value and app.line.case == case and app.line.card_text("q_per_length") == card
    assert messages[-1] == {"method": "update", "state": {"value": value}, "buffer_paths": []}  # page snaps back
    text = alert_text(app)
    assert text.startswith("Wind speed: the value sent by the page was refused (")
    assert_short_and_safe(text)
    warnings = [r for r in caplog.records if r.name == "dashboard.guard"]
    assert len(warnings) == 1 and warnings[0].levelno == logging.WARNING
    assert_clean(caplog, capsys)
    # a real value afterwards still reaches the case and the cards, and clears the alert
    wind._handle_msg(update({"value": 5.0}))
    expected = study.case.model_copy(update={"wind_speed": 5.0})
    assert wind.value == 5.0 and app.line.case.wind_speed == pytest.approx(5.0)
    assert app.line.card_text("q_per_length") == q_text(expected) != card
    assert app.alert.value == ""


def test_wind_slider_accepts_its_bounds(app, sent):
    wind = app.line.controls["wind_speed"].widget
    for value in (wind.max, wind.min, 0.5 * (wind.min + wind.max)):
        wind._handle_msg(update({"value": value}))
        assert wind.value == value and app.line.case.wind_speed == pytest.approx(value)
    assert app.alert.value == ""


@pytest.mark.parametrize("state", [{"max": 1e9}, {"min": -5.0, "value": -5.0}, {"step": 0.0}, {"max": "abc"},
                                   {"layout": "IPY_MODEL_x"}, {"style": None}])
def test_slider_bounds_and_structure_are_set_by_the_app_only(app, state, caplog, capsys):
    wind = app.line.controls["wind_speed"].widget
    before = (wind.min, wind.max, wind.step, wind.value, wind.layout)
    wind._handle_msg(update(state))
    assert (wind.min, wind.max, wind.step, wind.value, wind.layout) == before
    assert "refused (only the app sets this)" in alert_text(app)
    assert_clean(caplog, capsys)


def test_boxes_keep_their_children(app, caplog, capsys):
    inputs = app.line.inputs
    children = inputs.children
    inputs._handle_msg(update({"children": []}))
    inputs._handle_msg(update({"children": ["IPY_MODEL_" + app.tabs.model_id]}))
    assert inputs.children == children
    assert_clean(caplog, capsys)


def test_unknown_keys_are_ignored_and_known_ones_applied(app, caplog, capsys):
    wind = app.line.controls["wind_speed"].widget
    case = app.line.case
    with caplog.at_level(logging.WARNING):
        wind._handle_msg(update({"no_such_key": 1, "__class__": "x"}))
    assert app.line.case == case and app.alert.value == ""
    assert any("does not sync" in r.getMessage() for r in caplog.records)
    wind._handle_msg(update({"no_such_key": [1], "value": 4.0}))
    assert app.line.case.wind_speed == pytest.approx(4.0)
    assert_clean(caplog, capsys)


@pytest.mark.parametrize("state, reason", [
    ({f"k{i}": 1 for i in range(200)}, "too many values at once"),
    ({"description": "x" * 200_000}, "too long a text"),
    ({"_dom_classes": nested(40)}, "data nested too deeply"),
    ({"_dom_classes": [["x"] * 9_000] * 30}, "too much data"),
])
def test_oversized_states_are_refused(app, state, reason, caplog, capsys):
    wind = app.line.controls["wind_speed"].widget
    description, classes = wind.description, wind._dom_classes
    wind._handle_msg(update(state))
    assert wind.description == description and wind._dom_classes == classes
    assert f"refused ({reason})" in alert_text(app)
    assert_clean(caplog, capsys)


# ---------------------------------------------------------------------------- dropdowns and tabs
@pytest.mark.parametrize("index", [99, -1, "1", None, 1.5, True, [0], {"i": 0}, float("nan")],
                         ids=lambda v: repr(v))
def test_dropdown_refuses_an_index_that_is_not_a_choice(app, sent, index, caplog, capsys):
    natural = app.line.natural
    assert len(natural.options) > 1
    value, case = natural.value, app.line.case
    messages = sent(natural)
    natural._handle_msg(update({"index": index}))
    assert natural.value == value and app.line.case == case
    assert messages[-1]["state"] == {"index": natural.index}
    text = alert_text(app)
    assert text.startswith("Natural law: the value sent by the page was refused (")
    assert_short_and_safe(text)
    assert_clean(caplog, capsys)


def test_dropdown_ignores_labels_and_values_and_keeps_its_choices(app, caplog, capsys):
    natural = app.line.natural
    value, labels = natural.value, natural._options_labels
    natural._handle_msg(update({"label": "nonsense", "value": "nonsense"}))  # not synced: ignored
    assert natural.value == value and app.alert.value == ""
    natural._handle_msg(update({"_options_labels": ["a", "b"], "index": 0}))
    assert natural._options_labels == labels and natural.value == value
    assert "refused (only the app sets the choices)" in alert_text(app)
    # a real choice afterwards reaches the case
    natural._handle_msg(update({"index": 1}))
    assert natural.index == 1 and app.line.case.natural == natural.options[1][1]
    assert_clean(caplog, capsys)


@pytest.mark.parametrize("index", [99, -1, "abc", 1e300])
def test_tabs_refuse_an_index_that_is_not_a_tab(app, index, caplog, capsys):
    selected = app.tabs.selected_index
    app.tabs._handle_msg(update({"selected_index": index}))
    assert app.tabs.selected_index == selected
    assert "refused (not one of the tabs)" in alert_text(app)
    app.tabs._handle_msg(update({"selected_index": 1}))
    assert app.visible == app.order[1]
    assert_clean(caplog, capsys)


# ---------------------------------------------------------------------------- malformed messages
@pytest.mark.parametrize("msg", [
    None, "update", {}, {"content": None}, {"content": {"data": "x"}}, {"content": {"data": {"method": "nope"}}},
    {"content": {"data": {"method": "update", "state": "abc"}}},
    {"content": {"data": {"method": "update", "state": [1, 2]}}},
    update({"value": None}, buffer_paths=[["value", "x"]], buffers=[b"1"]),
    update({"value": 1.0}, buffer_paths=[["value"]], buffers=[]),
    update({"value": 1.0}, buffer_paths="value", buffers=[b"1"]),
    update({"value": 1.0}, buffer_paths=[["value"]], buffers=["not bytes"]),
    update({"value": 1.0}, buffer_paths=[["value"]], buffers=[b"1"]),  # bytes for a number
], ids=lambda m: repr(m)[:50])
def test_malformed_messages_change_nothing(app, msg, caplog, capsys):
    wind = app.line.controls["wind_speed"].widget
    value, case = wind.value, app.line.case
    wind._handle_msg(msg)
    assert wind.value == value and app.line.case == case
    assert_short_and_safe(alert_text(app))
    assert_clean(caplog, capsys)


def test_request_state_and_buffers_still_work(sent):
    image = widgets.Image(value=b"")
    image._handle_msg(update({"value": None}, buffer_paths=[["value"]], buffers=[memoryview(b"png")]))
    assert bytes(image.value) == b"png"
    messages = sent(image)
    image._handle_msg({"content": {"data": {"method": "request_state"}}})
    assert messages and messages[-1]["method"] == "update"


# ---------------------------------------------------------------------------- failures while applying
def test_an_observer_failing_rolls_the_value_back(told, sent, caplog, capsys):
    slider = widgets.FloatSlider(value=1.0, min=0.0, max=10.0, description="Test [m/s]")
    seen = []

    def observer(change):
        seen.append(change["new"])
        if change["new"] == 7.0:
            raise RuntimeError("/srv/secret/path.py failed")

    slider.observe(observer, "value")
    messages = sent(slider)
    slider._handle_msg(update({"value": 7.0}))
    assert slider.value == 1.0 and seen == [7.0, 1.0]  # applied, failed, put back (observers see it)
    assert messages[-1]["state"] == {"value": 1.0}
    assert told == ["Test: the value sent by the page was refused (it was not accepted); "
                    "the control shows its current value again."]
    assert all("secret" not in r.getMessage() for r in caplog.records)
    assert_clean(caplog, capsys)


def test_a_failing_button_handler_becomes_a_message(told, caplog, capsys):
    button = widgets.Button(description="Go")
    clicks = []
    button.on_click(lambda b: 1 / 0)
    button.on_click(clicks.append)  # the handlers after a failing one still run
    button._handle_msg({"content": {"data": {"method": "custom", "content": {"event": "click"}}}})
    assert clicks == [button]
    assert told == ["Go: the action could not be carried out."]
    assert [r.getMessage() for r in caplog.records if r.name == "dashboard.guard"] == [
        "refused an action from the page for Button: it could not be handled (ZeroDivisionError)"]
    assert_clean(caplog, capsys)


def test_a_failing_custom_message_handler_becomes_a_message(told, caplog, capsys):
    slider = widgets.FloatSlider(description="Speed")
    slider.on_msg(lambda widget, content, buffers: content["missing"])
    slider._handle_msg({"content": {"data": {"method": "custom", "content": {}}}})
    slider._handle_msg({"content": {"data": {"method": "custom", "content": ["x"] * 20_000}}})
    assert told == ["Speed: the action could not be carried out.",
                    "Speed: the request sent by the page was refused (too long a list)."]
    assert_clean(caplog, capsys)


def test_other_bounded_controls(told, caplog, capsys):
    log_slider = widgets.FloatLogSlider(value=10.0, min=0, max=4)  # bounds are exponents: 1 … 10000
    log_slider._handle_msg(update({"value": 1e3}))
    assert log_slider.value == 1e3
    log_slider._handle_msg(update({"value": 1e5}))
    assert log_slider.value == 1e3 and "outside 1 … 10000" in told[-1]
    span = widgets.FloatRangeSlider(value=(2.0, 4.0), min=0.0, max=10.0)
    for bad in ([5.0, 1.0], [1.0], [1.0, 20.0], ["a", 2.0], [float("nan"), 2.0]):
        span._handle_msg(update({"value": bad}))
        assert span.value == (2.0, 4.0)
    span._handle_msg(update({"value": [1.0, 5.0]}))
    assert span.value == (1.0, 5.0)
    integer = widgets.IntSlider(value=3, min=0, max=10)
    integer._handle_msg(update({"value": 2.5}))
    assert integer.value == 3 and "not a whole number" in told[-1]
    assert_clean(caplog, capsys)


def test_refusals_of_other_widgets_do_not_show_in_the_app(app):
    stray = widgets.FloatSlider(value=1.0)
    stray._handle_msg(update({"value": "abc"}))
    assert stray.value == 1.0 and app.alert.value == ""


# ---------------------------------------------------------------------------- the kernel's comm path
def test_comm_manager_path_logs_no_traceback(app, caplog, capsys):
    """The way ipykernel delivers a comm_msg: nothing reaches its "Exception in comm_msg" logging."""
    wind = app.line.controls["wind_speed"].widget
    manager = CommManager()
    manager.register_comm(wind.comm)
    value = wind.value
    with caplog.at_level(logging.WARNING):
        for bad in ("abc", None, float("nan"), [1] * 100_000):
            manager.comm_msg(None, None, {"content": {"comm_id": wind.comm.comm_id, "data": {
                "method": "update", "state": {"value": bad}, "buffer_paths": []}}})
    assert wind.value == value
    assert not [r for r in caplog.records if r.levelno >= logging.ERROR]
    assert len([r for r in caplog.records if r.name == "dashboard.guard"]) == 4
    assert_clean(caplog, capsys)


def test_comm_loggers_log_failures_without_traceback(app, caplog):
    for name in ("Comm", "ipykernel.comm"):
        try:
            raise KeyError("method")
        except KeyError:
            logging.getLogger(name).error("Exception in comm_msg for %s", "abc123", exc_info=True)
        record = caplog.records[-1]
        assert record.exc_info is None and record.exc_text is None
        assert record.getMessage() == "Exception in comm_msg for abc123 (KeyError; traceback not shown)"
