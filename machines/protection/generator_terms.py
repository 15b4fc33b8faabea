"""The words for a generator's prime mover and exciter, so that every finding names the plant as it is.

A diesel has no turbine valves and a water turbine no fuel: the rules take the machine's own words from here.
"""

from __future__ import annotations

#: what the prime mover is called in a sentence
PRIME_MOVER_NAME = {"steam-turbine": "steam turbine", "gas-turbine": "gas turbine", "hydro": "water turbine",
                    "reciprocating-engine": "engine"}
#: the signal that says the prime mover is shut down (sequential tripping of the 32)
SHUTDOWN_SIGNAL = {"steam-turbine": "turbine stop valves closed", "gas-turbine": "fuel valves closed",
                   "hydro": "wicket gates closed", "reciprocating-engine": "fuel shut off (rack at zero or gas "
                                                                          "valve closed)"}
#: why motoring harms it
MOTORING_HARM = {"steam-turbine": "the last turbine stages overheat without steam flow",
                 "gas-turbine": "the unit draws power to drive its compressor",
                 "hydro": "the runner cavitates when the gates are closed with water in the draft tube",
                 "reciprocating-engine": "unburnt fuel collects and the engine may be damaged or catch fire"}
EXCITER_NAME = {"static": "static exciter fed from the terminals", "brushless": "brushless exciter",
                "rotating-dc": "rotating DC exciter"}


def prime_mover(kind: str) -> str:
    """'engine', 'steam turbine', … for ``machine.prime_mover``.

    >>> prime_mover("reciprocating-engine")
    'engine'
    """
    return PRIME_MOVER_NAME.get(kind, kind.replace("-", " "))


def with_article(noun: str) -> str:
    """'an engine', 'a steam turbine'.

    >>> with_article("engine"), with_article("water turbine")
    ('an engine', 'a water turbine')
    """
    return ("an " if noun[:1].lower() in "aeiou" else "a ") + noun


def shutdown_signal(kind: str) -> str:
    """The prime mover's shut-down signal, e.g. 'wicket gates closed'.

    >>> shutdown_signal("hydro")
    'wicket gates closed'
    """
    return SHUTDOWN_SIGNAL.get(kind, "prime mover shut down")


def is_turbine(kind: str) -> bool:
    """Whether the prime mover is a turbine with blades tuned near the running speed (steam or gas)."""
    return kind in ("steam-turbine", "gas-turbine")
