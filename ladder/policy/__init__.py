"""The investment policy: ``policy.toml`` (docs/policy.md), the rule checker and the pre-trade what-if.

Modules (import them directly; this package imports nothing). Rating scales are a market convention
and live in ``ladder.market.ratings``.
- ``policy_file``: ``load_policy(path)`` / ``parse_policy(text, file)`` -> ``model.Policy``
- ``measures``: ``PositionMeasures`` (what the checker needs per holding), ``cash_by_month``
- ``checker``: ``check(policy, measures, cash_needs)`` -> ``results.CheckResult``
- ``trades``: ``read_trades``, ``apply_trades``; ``whatif``: ``check_trades`` -> ``whatif.TradeCheck``
"""
