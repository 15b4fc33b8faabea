"""The safety cautions every screen and every sheet carries (one wording, used by the CLI and the reports)."""

CAUTION_LINE = (
    "Caution: settings proposed by relaywright must be reviewed and approved by a competent, licensed engineer; "
    "local codes and the equipment makers' data take precedence; test the relay before service."
)

SAFETY_NOTICE = (
    "These settings are a proposal computed from the data entered and from published practice. They must be "
    "reviewed and approved by a competent, licensed engineer before use. Local codes and regulations and the "
    "machine, relay and switchgear makers' data take precedence over anything on this sheet. Values marked as "
    "common practice or from memory are editable defaults, not limits. The relay must be tested with the "
    "settings applied (see the commissioning test table) before the machine is put into service. Protection "
    "settings affect the safety of people and equipment."
)
