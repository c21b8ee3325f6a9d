"""The investment policy: ``policy.toml`` (docs/policy.md), rating scales, the rule checker and the
pre-trade what-if.

Modules (import them directly; this package imports nothing, so the book reader can use
``ladder.policy.ratings`` without a cycle):
- ``policy_file``: ``load_policy(path)`` / ``parse_policy(text, file)`` -> ``model.Policy``
- ``ratings``: scales, equivalences, split-rating resolution, ``is_known_long`` / ``explain_long`` ...
- ``measures``: ``PositionMeasures`` (what the checker needs per holding), ``cash_by_month``
- ``checker``: ``check(policy, measures, cash_needs)`` -> ``results.CheckResult``
- ``trades``: ``read_trades``, ``apply_trades``; ``whatif``: ``check_trades`` -> ``whatif.TradeCheck``
"""
