"""The cash plan: projected cash flows, reinvestment, shortfalls and interest income over a horizon.

``periods`` cuts the horizon, ``rates`` gives the curve a scenario sees on every future date,
``calls`` decides which callables are called, ``holding_flows`` buckets the holdings' cash and
income by period, ``purchases`` makes the reinvestment buys, ``sales`` covers a shortfall,
``projection`` runs the periods and ``returns`` values the horizon. The façade is
``ladder.analysis.plan``.
"""
