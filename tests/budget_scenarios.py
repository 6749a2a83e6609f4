"""Small made-up scenarios shared by the budget and report tests (typical board values)."""

from __future__ import annotations

from pathlib import Path

from losslane.scenario import parse_scenario

# a centred stripline in a typical low-loss laminate; 5.3 mil is about 53 ohm, 9 mil about
# 40 ohm (checked in the tests that rely on it)
LINES = """
[dielectrics.core]
dk = 3.5
df = 0.004
at = "10 GHz"

[lines.route]
kind = "stripline"
width = "5.3 mil"
thickness = "0.6 mil"
below = "6 mil"
above = "6 mil"
dielectric = "core"

[lines.wide]
kind = "stripline"
width = "9 mil"
thickness = "0.6 mil"
below = "6 mil"
above = "6 mil"
dielectric = "core"
"""


def scenario_text(
    channel: str,
    budget: str = "",
    stop: str = "20 GHz",
    step: str = "50 MHz",
    start: str = "0 Hz",
    reference: str = "50 ohm",
    name: str = "test lane",
    extra: str = "",
) -> str:
    return (
        f'name = "{name}"\n'
        f'[sweep]\nstart = "{start}"\nstop = "{stop}"\nstep = "{step}"\n'
        f'[ports]\nreference = "{reference}"\n' + LINES + extra + channel + budget
    )


def pieces(line: str, lengths: list[str], prefix: str = "piece") -> str:
    return "".join(
        f'[[channel]]\nline = "{line}"\nlength = "{ln}"\nname = "{prefix} {i + 1}"\n'
        for i, ln in enumerate(lengths)
    )


SMALL_CHANNEL = (
    pieces("route", ["1.5 in"], "launch")
    + '[[channel]]\nvia = { barrel = "40 mil", stub = "15 mil", impedance = "44 ohm", '
    'dielectric = "core" }\nname = "layer via"\n'
    + '[[channel]]\ncapacitor = { value = "100 nF", esl = "0.3 nH", esr = "10 mohm" }\n'
    + pieces("route", ["4 in"], "main run")
)

PASSING_BUDGET = """
[budget]
data_rate = "10 Gb/s"
modulation = "nrz"
max_loss = "12 dB"
[[budget.check]]
at = "2.4 GHz"
max_loss = "5 dB"
min_return_loss = "8 dB"
"""


def write(tmp: Path, text: str, name: str = "lane.toml") -> Path:
    p = Path(tmp) / name
    p.write_text(text, encoding="utf-8")
    return p


def parse(text: str):
    return parse_scenario(text)
