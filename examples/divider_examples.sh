#!/usr/bin/env sh
# Example invocations of `taumatch divider` for our own invented scenario (not a
# reference design): a home-built 100:1 divider with 10 MΩ input into an instrument of
# 1 MΩ ∥ 14 pF through 90 pF of cable, and the same divider built as a 5 kV column.
# The test suite runs every `taumatch` line below, in order (tests/test_cli_divider.py).
set -e

# 1. Low-voltage 100:1 divider, trimmer in the shunt arm, E96 resistors.
taumatch divider --ratio 100 --input-resistance 10M --instrument "1M||14p" --cable-c 90p

# 2. The same with the trimmer across the tip arm, and E24 resistors.
taumatch divider --ratio 100 --input-resistance 10M --instrument "1M||14p" --cable-c 90p --arm tip --series E24

# 3. A 10:1 probe-style divider into the instrument alone (input 10 MΩ), Monte Carlo of the tolerances.
taumatch divider --ratio 10 --instrument "1M||14p" --cable-c 90p --monte-carlo 20000 --seed 1

# 4. 5 kV column: resistor string from the limiting voltage, 2 pF per section to earth over
#    10 sections, grading capacitors, cautions; JSON for scripts.
taumatch divider --ratio 100 --input-resistance 10M --instrument "1M||14p" --cable-c 90p \
    --voltage 5k --limiting-voltage 1.6k --stray-c 2p --sections 10 \
    --monte-carlo 20000 --seed 1 --json

# 5. The design of 1. written as a chain spec, then read by the chain commands: the trim
#    (the network finds the trimmer's nominal setting), bandwidth and loading, a SPICE deck.
taumatch divider --ratio 100 --input-resistance 10M --instrument "1M||14p" --cable-c 90p --spec divider.toml
taumatch trim divider.toml
taumatch bandwidth divider.toml
taumatch netlist divider.toml -o divider.cir
