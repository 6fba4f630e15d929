"""Commented starter design files written by ``cutplan new KIND``, and where the bundled example
designs are; scenarios of our own."""

from pathlib import Path

__all__ = ["CHIME", "BAR", "AIR_COLUMN", "STARTERS", "example_paths"]


def example_paths():
    """{name: path} of every bundled example design (``_examples`` inside the wheel, or
    ``examples/`` of a source checkout), by file name without ``.toml``; empty when neither exists."""
    here = Path(__file__).resolve().parent
    for candidate in (here / "_examples", here.parent / "examples"):
        if candidate.is_dir():
            return {p.stem: p for p in sorted(candidate.glob("*.toml"))}
    return {}

CHIME = '''# cutplan design: a starter chime set. Edit, then run: cutplan plan THIS-FILE
# Scenario: six aluminium tubes for a balcony, in a G major pentatonic scale.
title = "Balcony chime"
units = "in"              # lengths shown first in "mm" or "in"
# inch_denominator = 16   # inches to the nearest 1/8, 1/16, 1/32 (the default) or 1/64
paper = "letter"          # "letter" or "a4" for the PDF packet

[tuning]
a4 = 440                  # reference pitch, Hz
temperament = "equal"     # "equal", "equal-19", "just", "pythagorean"

[[set]]
name = "balcony"
kind = "chime"
scale = "major-pentatonic" # or: notes = ["G5", "A5", "B5"]  or: range = "G5..G6"
root = "G5"
count = 6
material = "aluminum-6063-t5"           # `cutplan materials` lists them
section = { stock = "al-1.000x0.065" }  # or { shape = "tube", outer = "1 in", wall = "0.065 in" }
# model = "slender"       # default "timoshenko" includes shear and rotary inertia
# target = "strike-note"  # tune the bell-like strike note instead of the lowest mode

[stock]
lengths = [{ length = "8 ft", count = 1 }]
kerf = "1/16 in"          # saw blade width
end_trim = "1/8 in"       # squared off each factory end of a stick
allowance = "risk 5 %"    # cut long enough that 1 piece in 20 at most comes out sharp;
                          # or a fixed "0.5 %" or "3 mm" (the plan then states its chance)
'''

BAR = '''# cutplan design: a starter bar set. Edit, then run: cutplan plan THIS-FILE
# Scenario: a one-octave kitchen-table glockenspiel in aluminium flat bar, no resonators.
title = "Kitchen-table bars"
units = "mm"
paper = "a4"

[tuning]
a4 = 440

[[set]]
name = "bars"
kind = "bar"
range = "C6..C7"
scale = "major"
material = "aluminum-6061-t6"
section = { shape = "bar", width = "25 mm", thickness = "8 mm" }

[stock]
lengths = [{ length = "1 m", count = 2 }]
kerf = "1.5 mm"
end_trim = "2 mm"
allowance = "1 %"
'''

AIR_COLUMN = '''# cutplan design: a starter set of tuned air columns. Edit, then run: cutplan plan THIS-FILE
# Scenario: eight open PVC pipes for a garden music wall, struck with a paddle.
title = "Garden music wall"
units = "mm"
paper = "a4"

[[set]]
name = "wall"
kind = "air-column"
scale = "major"
root = "C4"
count = 8
section = { stock = "pvc-sch40-1-1/4" }  # measured bore? add inner = "35.1 mm"
ends = "open-open"          # or "closed-open" (a capped pipe sounds an octave lower)
end_correction = "unflanged" # "flanged", "none", or a factor of the inner radius
temperature = "18 C"        # pitch of air columns rises about 3 cents per degree C
humidity = 60               # percent; leave out for 50 %, 0 for dry air

[stock]
lengths = [{ length = "10 ft" }]
kerf = "3 mm"
end_trim = "5 mm"
allowance = "risk 5 %"    # or a fixed "1 %" (the plan then states its chance of a sharp pipe)
'''

STARTERS = {"chime": CHIME, "bar": BAR, "air-column": AIR_COLUMN}
