"""The run of a branched scenario: named steps from the description to the tables' rows.

A branched scenario (:attr:`Scenario.topology`) runs group by group
(:func:`rheoline.scenario.network_build.network_groups`), each group in one vectorized
call of :meth:`rheoline.model.branched.PartNetwork.solve`, in these steps:

``build`` (:func:`~rheoline.scenario.network_build.build_network`)
    the fluid and the network; columns ``case``, ``scenario``, ``point``, ``fluid``,
    ``temperature [degC]``, ``drive`` ("network"), ``smallest bore [mm]``.
``solve`` (the network)
    ``flow [mL/min]`` and ``flow [mL/h]``: the total flow into the outlets;
    ``required pressure [mmHg]``: the highest pump pressure (with pumps; empty, NaN, where
    a pump is blocked: ``pump_blocked``), else the highest pressure applied at a bag or
    source; the pumps' ``pressure limit [mmHg]`` and ``over
    pressure limit``; ``reversed flow [mL/min]`` and ``reversed branch``: the largest flow
    against a branch's from -> to direction and its branch (0 and "" when none); the
    conditions ``backflow_into_source``, ``reversed_flow``, ``check_valve_closed``,
    ``pump_blocked``, ``over_pressure_limit``, ``not_converged`` and ``no_forward_flow`` from
    the result's arrays.
``branches`` (each branch's :class:`~rheoline.model.line.Line` at its solved flow, the
reversed line where the flow runs backwards)
    ``max Reynolds number``, ``regime``, ``dominant part`` (the part with the largest drop
    anywhere, named "branch / part") and its ``dominant share [%]`` of its branch's losses,
    ``max wall shear stress [Pa]``, ``hemolysis index [%]`` (largest branch, blood only),
    ``hemolysis concern``, ``transition zone``, and the per-part conditions (turbulent,
    transitional, laminar near transition, outside a
    correlation's range, hemolysis extrapolated).

The flags are rendered by :func:`rheoline.scenario.run.render_flags` from those arrays, as
for a line.  Besides the comparison table's rows, each case gives its parts' rows (every
branch's parts, named "branch / part", and each branch's exit), its branches' rows
(:data:`BRANCH_COLUMNS`) and its nodes' rows (:data:`NODE_COLUMNS`).

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> sset = load_scenarios(example_path("ward-y-site"))
>>> [run] = run_network_scenario(sset.scenarios[0], sset.source)
>>> case = run.cases()[-1]                                  # 1500 mL/h
>>> [(r[1], r[6]) for r in case[4][0]]                     # branch, direction
[('gravity set', 'reversed'), ('pump line', 'forward'), ('extension and catheter', 'forward')]
"""

from __future__ import annotations

import warnings
from types import SimpleNamespace

import numpy as np

from rheoline.errors import RheolineError, RheolineWarning, ScenarioError
from rheoline.model.conditions import IMPLAUSIBLE_PRESSURE
from rheoline.model.provenance import merge_models
from rheoline.scenario.build import point_part_names
from rheoline.scenario.model_band import BAND_COLUMNS
from rheoline.scenario.network_build import branch_group, build_network, network_groups
from rheoline.scenario.steps import part_rows
from rheoline.scenario.transient_step import TRANSIENT_COLUMNS
from rheoline.units import ML_PER_H, ML_PER_MIN, MMHG

__all__ = [
    "NETWORK_DRIVE",
    "BRANCH_COLUMNS",
    "NODE_COLUMNS",
    "NetworkGroupRun",
    "run_network_scenario",
    "check_network_scenario",
]

#: The ``drive`` column of a branched case.
NETWORK_DRIVE = "network"
BRANCH_COLUMNS = [
    "case",
    "branch",
    "from",
    "to",
    "flow [mL/min]",
    "flow [mL/h]",
    "direction",
    "reversed",
    "check valve closed",
    "pressure drop [mmHg]",
    "max Reynolds number",
    "regime",
    "dominant part",
    "max wall shear stress [Pa]",
]
NODE_COLUMNS = [
    "case",
    "node",
    "type",
    "pressure [mmHg]",
    "flow in [mL/min]",
    "pressure limit [mmHg]",
    "over pressure limit",
]
#: A branch's line is evaluated at its |flow|, and at least this [m^3/s] (a closed valve).
_FLOOR = 1e-15
_REGIMES = ("laminar", "transitional", "turbulent")


class _BranchFlow:
    """One branch's line at its solved flows: forward where the flow runs from -> to, the
    reversed line (its parts in the other order) where it runs back.  Per-part arrays are
    in the branch's own part order either way."""

    def __init__(self, branch, reversed_line, fluid, flow):
        self.back = np.asarray(flow) < 0.0
        size = np.maximum(np.abs(flow), _FLOOR)
        self.forward = None if np.all(self.back) else branch.line.solve(fluid, flow=size)
        self.backward = None if not np.any(self.back) else reversed_line.solve(fluid, flow=size)

    def _pick(self, name, flip):
        got = []
        for res in (self.forward, self.backward):
            if res is None:
                got.append(None)
                continue
            value = getattr(res, name)
            value = value if isinstance(value, dict) else np.asarray(value)
            got.append(value)
        f, b = got
        if flip and b is not None:
            b = {k: v[::-1] for k, v in b.items()} if isinstance(b, dict) else b[::-1]
        if f is None or b is None:
            return f if b is None else b
        if isinstance(f, dict):
            return {k: np.where(self.back, b[k], f[k]) for k in f}
        return np.where(self.back, b, f)

    def __getattr__(self, name):
        if name.startswith("_") or name in ("forward", "backward", "back"):
            raise AttributeError(name)
        return self._pick(name, flip=name.startswith("part_"))

    @property
    def results(self):
        """The line results solved (forward, reversed or both)."""
        return [r for r in (self.forward, self.backward) if r is not None]

    @property
    def pries_correction(self):
        """True when a line result applied the Pries 1992 diameter correction."""
        return any(r.pries_correction for r in self.results)


def _vec(x, n):
    return np.broadcast_to(np.asarray(x, dtype=float), (n,))


class NetworkGroupRun:
    """The named steps of one :class:`~rheoline.scenario.network_build.NetworkGroup`.

    As :class:`rheoline.scenario.run` 's line groups: ``columns`` maps a table column to a
    list over the group's points, ``conditions`` a flag key to a boolean array,
    ``notes`` collects ``(key, text)``; ``models_used`` the provenance keys.
    """

    def __init__(self, g, source):
        self.g, self.source, self.n = g, source, g.size
        self.topo = g.scenario.topology
        self.columns, self.conditions, self.notes = {}, {}, []
        self.models_used = ()

    def run(self):
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            self.build()
            self.solve()
            self.branches()
        from rheoline.scenario.run import _warning_key

        said = [w.message for w in caught if isinstance(w.message, RheolineWarning)]
        self.notes += [(_warning_key(m), str(m)) for m in said]
        return self

    # ----------------------------------------------------------------------- build
    def build(self):
        g, n, c = self.g, self.n, self.columns
        self.built = build_network(g, self.source)
        self.fluid, self.net = self.built.fluid, self.built.network
        c["case"] = [g.scenario.name + (f" | {label}" if label else "") for label in g.labels]
        c["scenario"], c["point"] = [g.scenario.name] * n, list(g.labels)
        c["fluid"] = [g.values["fluid"]] * n
        c["temperature [degC]"] = _vec(g.values["temperature"], n).tolist()
        c["drive"] = [NETWORK_DRIVE] * n
        c["gauge"] = [None] * n
        bores = [
            _vec(p.inner_diameter, n)
            for parts in self.built.branch_parts
            for p in parts
            if getattr(p, "inner_diameter", None) is not None
        ]
        c["smallest bore [mm]"] = (np.min(bores, axis=0) * 1e3).tolist() if bores else _nan(n)
        for key in ("head [cm]", "source pressure [mmHg]", "back pressure [mmHg]"):
            c[key] = _nan(n)
        for what in ("flow p5 [mL/min]", "flow p95 [mL/min]", "pressure p5 [mmHg]"):
            c[what] = _nan(n)
        c["pressure p95 [mmHg]"] = _nan(n)
        c["dominant tolerance"] = [""] * n
        for key in BAND_COLUMNS:  # the model band is computed for lines only
            c[key] = [""] * n if key == "model band driver" else _nan(n)
        c["time to deliver [min]"] = _nan(n)
        c["catheter-to-vein ratio [-]"] = _nan(n)
        for name in TRANSIENT_COLUMNS:  # the time solve is a line's, not a network's
            c[name] = _nan(n)

    # ----------------------------------------------------------------------- solve
    def solve(self):
        n, c, topo = self.n, self.columns, self.topo
        try:
            res = self.res = self.net.solve(self.fluid)
        except RheolineError as exc:
            raise ScenarioError(
                str(exc), source=self.source, scenario=repr(self.g.scenario.name), field="fluid"
            ) from None
        held = [p.node for p in self.net.topology.pressure_nodes]
        inflow = {node: res.pressure_node_inflow[k].reshape(n) for k, node in enumerate(held)}
        outlets = [nd.name for nd in topo.nodes if nd.type == "outlet"]
        total = -sum((inflow[o] for o in outlets), np.zeros(n))
        c["flow [mL/min]"] = (total / ML_PER_MIN).tolist()
        c["flow [mL/h]"] = (total / ML_PER_H).tolist()
        self.drive_pressure = self._drive_pressure(res)
        c["required pressure [mmHg]"] = (self.drive_pressure / MMHG + 0.0).tolist()
        limits = [
            _vec(v["pressure_limit"], n)
            for nd, v in zip(topo.nodes, self.g.nodes, strict=True)
            if nd.type == "pump" and "pressure_limit" in v
        ]
        over = res.conditions["over_pressure_limit"].reshape(n)
        c["pressure limit [mmHg]"] = (np.min(limits, axis=0) / MMHG).tolist() if limits else _nan(n)
        c["over pressure limit"] = [bool(o) for o in over] if limits else [None] * n
        flows = res.branch_flow.reshape(len(topo.branches), n)
        back = np.where(res.reversed.reshape(flows.shape), -flows, 0.0)
        worst = np.argmax(back, axis=0)
        amount = back[worst, np.arange(n)]
        c["reversed flow [mL/min]"] = (amount / ML_PER_MIN).tolist()
        c["reversed branch"] = [
            topo.branches[w].name if a > 0 else "" for w, a in zip(worst, amount, strict=True)
        ]
        cond = self.conditions
        for key in ("backflow_into_source", "reversed_flow", "check_valve_closed", "pump_blocked"):
            cond[key] = res.conditions[key].reshape(n)
        cond["over_pressure_limit"] = over & bool(limits)
        cond["not_converged"] = res.conditions["not_converged"].reshape(n)
        cond["no_forward_flow"] = ~(total > 0) if outlets else np.zeros(n, bool)
        self.inflow = inflow

    def _drive_pressure(self, res):
        """Highest pump pressure, or (without pumps) the highest pressure applied at a bag
        or source [Pa], per point."""
        n = self.n
        if len(res.pump_pressure):
            return np.max(res.pump_pressure.reshape(-1, n), axis=0)
        applied = [
            _vec(v.get("pressure", 0.0), n)
            for nd, v in zip(self.topo.nodes, self.g.nodes, strict=True)
            if nd.type in ("bag", "source")
        ]
        return np.max(applied, axis=0) if applied else np.zeros(n)

    # ----------------------------------------------------------------------- branches
    def branches(self):
        n, res = self.n, self.res
        self.flows = [
            _BranchFlow(b, r, self.fluid, res.branch_flow[k].reshape(n))
            for k, (b, r) in enumerate(zip(self.net.branches, self.net._reversed, strict=True))
        ]
        self.names = [
            point_part_names(branch_group(self.g, k), b.line)
            for k, b in enumerate(self.net.branches)
        ]
        self.models_used = merge_models(
            *(r.models_used for f in self.flows for r in f.results), res.models_used
        )
        c = self.columns
        re = np.array([_vec(f.max_reynolds, n) for f in self.flows])
        c["max Reynolds number"] = re.max(axis=0).tolist()
        ranks = np.array(
            [[_REGIMES.index(str(r)) for r in np.atleast_1d(f.regime)] for f in self.flows]
        )
        c["regime"] = [_REGIMES[k] for k in ranks.max(axis=0)]
        self._part_conditions()
        c["transition zone"] = self.conditions["transition_zone"].tolist()
        self._dominant()
        wss = np.array([_vec(f.max_wall_shear_stress, n) for f in self.flows]).max(axis=0)
        c["max wall shear stress [Pa]"] = wss.tolist()
        hemo = np.array([_vec(f.hemolysis_index, n) for f in self.flows])
        c["hemolysis index [%]"] = hemo.max(axis=0).tolist()  # NaN: no red cells
        c["hemolysis concern"] = self.conditions["hemolysis_concern"].tolist()

    def _dominant(self):
        n, c = self.n, self.columns
        drops = [np.asarray(f.part_pressure_drops, float).reshape(-1, n) for f in self.flows]
        best = [np.argmax(d, axis=0) for d in drops]
        tops = np.array([d[b, np.arange(n)] for d, b in zip(drops, best, strict=True)])
        which = np.argmax(tops, axis=0)
        names, shares = [], []
        for col, k in enumerate(which):
            total = drops[k][:, col].sum() + float(_vec(self.flows[k].exit_pressure_drop, n)[col])
            part = best[k][col]
            names.append(f"{self.net.branches[k].name} / {self.names[k][part, col]}")
            shares.append(100.0 * drops[k][part, col] / total if total > 0 else np.nan)
        c["dominant part"], c["dominant share [%]"] = names, shares

    def _part_conditions(self):
        """Per-part turbulent and transitional lumens (every branch's parts in order), and
        the branches' outside-range, hemolysis, measured-part, plausibility and convergence
        conditions, from their line results (a pump or source pressure beyond any line's
        is implausible too, as for a line)."""
        n = self.n
        per_part = {"turbulent": [], "transitional": [], "transition_zone": []}
        held = dict.fromkeys(
            (
                "outside_range",
                "hemolysis_extrapolated",
                "hemolysis_concern",
                "measured_extrapolated",
                "implausible",
                "not_converged",
            )
        )
        held = {key: np.zeros(n, bool) for key in held}
        for f in self.flows:
            part_cond = f.part_conditions
            for key in per_part:
                per_part[key].append(np.asarray(part_cond[key]).reshape(-1, n))
            cond = f.conditions
            for key in held:
                held[key] |= np.asarray(cond[key]).reshape(n)
        self.part_conditions = {k: np.concatenate(v) for k, v in per_part.items()}
        for key in per_part:
            self.conditions[key] = self.part_conditions[key].any(axis=0)
        held["not_converged"] |= self.conditions["not_converged"]  # the network's own
        held["implausible"] |= self.drive_pressure > IMPLAUSIBLE_PRESSURE
        self.conditions.update(held)

    def note_views(self):
        """Per branch, a line-run view (``res``, ``parts``, ``n``, ``point_names``,
        ``notes``) that :func:`rheoline.scenario.steps.scenario_notes` reads; the first
        carries the group's own notes (warnings and the network's words)."""
        views = []
        for k, (f, b, names) in enumerate(
            zip(self.flows, self.net.branches, self.names, strict=True)
        ):
            named = np.vectorize(lambda x, b=b: f"{b.name} / {x}", otypes=[object])(names)
            views.append(
                SimpleNamespace(
                    res=f,
                    parts=b.line.parts,
                    n=self.n,
                    point_names=named,
                    notes=self.notes if k == 0 else [],
                )
            )
        return views

    # ----------------------------------------------------------------------- rows
    def _flag_data(self, col):
        """What the flags of point ``col`` name: parts, branches, bags and amounts."""
        labels = [
            f"{b.name} / {names[j, col]}"
            for b, names in zip(self.net.branches, self.names, strict=True)
            for j in range(len(b.line.parts))
        ]
        data = {
            key: [labels[j] for j in np.flatnonzero(self.part_conditions[key][:, col])]
            for key in ("turbulent", "transitional", "transition_zone")
        }
        for key, mask in (("reversed", self.res.reversed), ("closed", self.res.closed)):
            held = mask.reshape(-1, self.n)[:, col]
            data[key] = [b.name for b, on in zip(self.net.branches, held, strict=True) if on]
        stuck = self.res.node_conditions["blocked"].reshape(-1, self.n)[:, col]
        blocked = [node for node, on in zip(self.res.node_names, stuck, strict=True) if on]
        pumps = [
            p.node
            for p in self.net.topology.pumps
            if p.node not in blocked and float(_vec(p.flow, self.n)[col]) > 0.0
        ]
        data["backflow"] = [
            (node, float(-q[col] / ML_PER_MIN), pumps)
            for node, q in self.inflow.items()
            if self.topo.node(node).type != "outlet" and q[col] < 0.0
        ]
        data["blocked"] = blocked
        data["ratio"] = np.nan
        return data

    def cases(self):
        """``(index, table row, part rows, flags, (branch rows, node rows))`` per point."""
        from rheoline.scenario.run import TABLE_COLUMNS, render_flags

        flags = [render_flags(self.conditions, self._flag_data(col), col) for col in range(self.n)]
        self.columns["flags"] = ["; ".join(f) for f in flags]
        rows = [list(r) for r in zip(*(self.columns[k] for k in TABLE_COLUMNS), strict=True)]
        parts = self._part_rows()
        extra = [(self._branch_rows(col), self._node_rows(col)) for col in range(self.n)]
        return list(zip(self.g.indices, rows, parts, flags, extra, strict=True))

    def _part_rows(self):
        out = [[] for _ in range(self.n)]
        for f, b, names in zip(self.flows, self.net.branches, self.names, strict=True):
            view = SimpleNamespace(
                res=f,
                parts=b.line.parts,
                n=self.n,
                point_names=names,
                line=b.line,
                columns={"case": self.columns["case"]},
            )
            for col, rows in enumerate(part_rows(view)):
                for row in rows:
                    row[1], row[-1] = f"{b.name} / {row[1]}", f"{b.name} / {row[-1]}"
                out[col] += rows
        return out

    def _branch_rows(self, col):
        n, res, case = self.n, self.res, self.columns["case"][col]
        rows = []
        for k, (b, f) in enumerate(zip(self.net.branches, self.flows, strict=True)):
            q = float(res.branch_flow[k].reshape(n)[col])
            back = bool(res.reversed[k].reshape(n)[col])
            shut = bool(res.closed[k].reshape(n)[col])
            drops = np.asarray(f.part_pressure_drops, float).reshape(-1, n)[:, col]
            rows.append(
                [
                    case,
                    b.name,
                    b.start,
                    b.end,
                    q / ML_PER_MIN,
                    q / ML_PER_H,
                    "closed (check valve)" if shut else ("reversed" if back else "forward"),
                    back,
                    shut,
                    float(res.branch_drop[k].reshape(n)[col]) / MMHG,
                    float(_vec(f.max_reynolds, n)[col]),
                    str(np.atleast_1d(f.regime)[col]),
                    self.names[k][int(np.argmax(drops)), col],
                    float(_vec(f.max_wall_shear_stress, n)[col]),
                ]
            )
        return rows

    def _node_rows(self, col):
        n, res, case = self.n, self.res, self.columns["case"][col]
        pressure = dict(zip(res.node_names, res.node_pressure.reshape(-1, n)[:, col], strict=True))
        stuck = dict(
            zip(res.node_names, res.node_conditions["blocked"].reshape(-1, n)[:, col], strict=True)
        )
        rows = []
        for node, v in zip(self.topo.nodes, self.g.nodes, strict=True):
            limit, over = np.nan, None
            if node.type == "pump":
                # a blocked pump delivers nothing (the solve's answer for it)
                flow = 0.0 if stuck[node.name] else float(_vec(v["flow"], n)[col])
                if "pressure_limit" in v:
                    limit = float(_vec(v["pressure_limit"], n)[col])
                    over = bool(pressure[node.name] > limit or stuck[node.name])
                    limit /= MMHG
            else:
                flow = float(self.inflow[node.name][col]) if node.held else 0.0
            rows.append(
                [
                    case,
                    node.name,
                    node.type,
                    float(pressure[node.name]) / MMHG,
                    flow / ML_PER_MIN,
                    limit,
                    over,
                ]
            )
        return rows


def _nan(n):
    return [np.nan] * n


def run_network_scenario(sc, source):
    """The :class:`NetworkGroupRun` of every sweep group of the branched scenario ``sc``."""
    return [NetworkGroupRun(g, source).run() for g in network_groups(sc)]


def check_network_scenario(sc, source):
    """Build every group's network of ``sc`` (solve nothing); a ScenarioError names the
    field of a model error."""
    for g in network_groups(sc):
        build_network(g, source)
