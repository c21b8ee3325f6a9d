"""ladder: a treasury workstation for a corporate cash ladder.

Decision support only; not investment advice. Confirm every figure against custodian records;
the board-approved investment policy and licensed advisers decide.
"""

__version__ = "0.1.0"

CAUTION = (
    "Decision support only, not investment advice. Confirm figures against custodian records; "
    "the board-approved policy and licensed advisers decide. Rate scenarios are hypothetical."
)
