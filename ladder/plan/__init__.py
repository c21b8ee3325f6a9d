"""The cash plan: projected cash flows, reinvestment, shortfalls and interest income over a horizon.

``periods`` cuts the horizon, ``rates`` gives the curve a scenario sees on every future date and
the terms of what is bought, ``calls`` decides which callables are called, ``holding_flows``
buckets the holdings' cash and income by period, ``reinvestment`` resolves the rule, tenor, sector
and spread, ``sales`` covers a shortfall, ``projection`` runs the periods and ``returns`` values the
horizon. The façade is ``ladder.analysis.plan``.
"""
