// The dispatcher's page: fills the form from /v1/routes, /v1/aircraft and
// /v1/weather, sends plans and assessments, shows the answer. No network
// access beyond this service.
"use strict";
const $ = (id) => document.getElementById(id);

function token() { return $("f-token").value.trim(); }

async function api(method, path, body) {
  const h = { "Accept": "application/json" };
  if (body !== undefined) h["Content-Type"] = "application/json";
  if (token()) h["Authorization"] = "Bearer " + token();
  const res = await fetch(path, { method, headers: h, body: body === undefined ? undefined : JSON.stringify(body) });
  let doc;
  try { doc = await res.json(); } catch (e) { doc = { error: "answer " + res.status + " is not JSON" }; }
  if (!res.ok) {
    const err = new Error((doc.field ? doc.field + ": " : "") + (doc.error || res.statusText));
    err.status = res.status;
    throw err;
  }
  return doc;
}

function status(msg, isErr) {
  const s = $("status");
  s.textContent = msg;
  s.className = isErr ? "error" : "";
}

function fillSelect(sel, values, labels) {
  sel.replaceChildren();
  values.forEach((v, i) => {
    const o = document.createElement("option");
    o.value = v; o.textContent = labels ? labels[i] : v;
    sel.appendChild(o);
  });
}

async function loadLists() {
  try {
    const [r, a, w] = await Promise.all([api("GET", "/v1/routes"), api("GET", "/v1/aircraft"), api("GET", "/v1/weather")]);
    fillSelect($("f-route"), r.routes);
    fillSelect($("f-aircraft"), a.aircraft.map(x => x.aircraft), a.aircraft.map(x => x.name + (x.mtow_kg ? " (MTOW " + x.mtow_kg + " kg)" : "")));
    const wn = w.weather.filter(x => !x.error).map(x => x.name);
    fillSelect($("f-weather"), [""].concat(wn), ["none: ISA, still air"].concat(w.weather.filter(x => !x.error).map(x => x.name + " (" + x.valid_times.length + " times)")));
    return true;
  } catch (e) {
    status("Cannot load the lists: " + e.message + (e.status === 401 ? " (enter the access token)" : ""), true);
    return false;
  }
}

function num(id) {
  const v = $(id).value.trim();
  return v === "" ? undefined : Number(v);
}

function request() {
  const req = { route: $("f-route").value, aircraft: $("f-aircraft").value, chart: true };
  const flight = $("f-flight").value.trim(); if (flight) req.flight = flight;
  for (const [id, k] of [["f-mass", "mass"], ["f-zfw", "zfw"], ["f-fuel", "fuel"], ["f-ci", "ci"], ["f-floor", "floor"]]) {
    const v = num(id); if (v !== undefined) req[k] = v;
  }
  const sp = $("f-speed").value.trim(); if (sp) req.speed = sp;
  const dep = $("f-depart").value.trim(); if (dep) req.depart = dep;
  const wx = $("f-weather").value; if (wx) req.weather = [wx];
  return req;
}

const f0 = (x) => x === null || x === undefined ? "-" : Number(x).toFixed(0);
const f1 = (x) => x === null || x === undefined ? "-" : Number(x).toFixed(1);
const f2 = (x) => x === null || x === undefined ? "-" : Number(x).toFixed(2);
const f3 = (x) => x === null || x === undefined ? "-" : Number(x).toFixed(3);
const fl = (x) => "FL" + String(Math.round(x)).padStart(3, "0");
const hm = (min) => { const m = Math.round(min); return Math.floor(m / 60) + "h" + String(m % 60).padStart(2, "0"); };

function marginClass(margin, floor) {
  if (margin === null || margin === undefined) return "";
  const d = margin - floor;
  if (d < 0) return "m-bad";
  if (d < 0.05) return "m-tight";
  if (d < 0.15) return "m-fair";
  return "m-good";
}

function show(ans, id) {
  const p = ans.plan;
  $("result").hidden = false;
  $("result-h").textContent = (p.assessed ? "Assessment" : "Plan") + (id ? " (record " + id + ")" : "");
  const items = [
    ["Profile", p.profile], ["Aircraft", p.aircraft], ["Departure", p.depart],
    ["Take-off mass", f0(p.takeoff_mass_kg) + " kg"], ["Distance", f0(p.distance_nm) + " NM"],
    ["Trip fuel, 1,500 ft to 1,500 ft", f0(p.totals.fuel_kg) + " kg"], ["Flight time", hm(p.totals.time_min)],
    ["Cost (fuel + CI x time)", f0(p.totals.cost) + " kg"], ["CO2", f0(p.totals.co2_kg) + " kg"],
    ["Landing mass", f0(p.totals.landing_mass_kg) + " kg"], ["Least buffet margin", f2(p.min_margin_g) + " g"],
    ["Floor / CI / speed", f2(p.floor_g) + " g / " + p.ci + " / " + p.speed],
  ];
  if (p.baseline) items.push(["Best constant level", fl(p.baseline.fl) + ", saving " + f1(p.baseline.saving_pct) + " %"]);
  const dl = document.createElement("dl");
  for (const [k, v] of items) {
    const div = document.createElement("div");
    const dt = document.createElement("dt"); dt.textContent = k;
    const dd = document.createElement("dd"); dd.textContent = v;
    div.append(dt, dd);
    dl.appendChild(div);
  }
  const blocks = [dl];
  if (p.fuel) {
    // The dispatch fuel block (ICAO Annex 6 components), as levelpath plan --zfw prints it.
    const f = p.fuel;
    const h = document.createElement("h3"); h.textContent = "Fuel (policy " + f.policy + ")";
    const t = document.createElement("table"); t.className = "fuel";
    for (const [k, v] of [["Taxi", f.taxi_kg], ["Trip", f.trip_kg], ["Contingency (" + f.contingency_basis + ")", f.contingency_kg],
      ["Alternate", f.alternate_kg], ["Final reserve", f.final_reserve_kg], ["Additional", f.additional_kg], ["Extra", f.extra_kg],
      ["Block", f.block_kg], ["ZFW", f.zfw_kg], ["Take-off mass", f.takeoff_mass_kg], ["Landing mass", f.landing_mass_kg]]) {
      const tr = document.createElement("tr");
      const th = document.createElement("th"); th.scope = "row"; th.textContent = k;
      const td = document.createElement("td"); td.textContent = f0(v) + " kg";
      tr.append(th, td); t.appendChild(tr);
    }
    const lim = document.createElement("p");
    lim.textContent = (f.limited_by ? "Limited by " + f.limited_by + ". " : "") +
      (f.max_payload_zfw_kg != null ? "Largest ZFW that fits: " + f0(f.max_payload_zfw_kg) + " kg (" + f.binding_limit + " binds)." : "");
    blocks.push(h, t, lim);
  }
  $("summary").replaceChildren(...blocks);
  const ul = document.createElement("ul");
  for (const w of p.warnings || []) { const li = document.createElement("li"); li.textContent = w; ul.appendChild(li); }
  for (const v of p.violations || []) {
    const li = document.createElement("li"); li.className = "viol";
    li.textContent = "Leg " + v.leg + ": " + v.limit + " broken by " + f2(v.by) + " " + v.unit + (v.detail ? " - " + v.detail : "");
    ul.appendChild(li);
  }
  if (p.assessed && (p.violations || []).length === 0) { const li = document.createElement("li"); li.textContent = "No limit broken."; ul.appendChild(li); }
  $("warnings").replaceChildren(ul);
  // The SVG comes from this service's chart code.
  $("chart").innerHTML = ans.chart_svg || "<p>No chart.</p>";
  const cols = [["Leg", l => l.segment], ["From NM", l => f0(l.from_nm)], ["To NM", l => f0(l.to_nm)], ["Phase", l => l.phase, "t"],
    ["Level", l => l.from_fl === l.fl ? fl(l.fl) : fl(l.from_fl) + "-" + fl(l.fl), "t"], ["Mach", l => f3(l.mach)], ["TAS kt", l => f0(l.tas_kt)],
    ["Wind kt", l => f0(l.wind_kt)], ["GS kt", l => f0(l.gs_kt)], ["ISA dev °C", l => f1(l.isa_dev_c)], ["Fuel kg", l => f0(l.fuel_kg)],
    ["Time min", l => f1(l.time_min)], ["Mass kg", l => f0(l.mass_start_kg)], ["Margin g", l => f2(l.buffet_margin_g), "m"],
    ["Floor g", l => f2(l.floor_g)], ["Floor set by", l => l.floor_reason, "t"], ["Max FL buffet", l => l.max_fl_buffet ? fl(l.max_fl_buffet) : "-"],
    ["Max FL thrust", l => l.max_fl_thrust ? fl(l.max_fl_thrust) : "-"]];
  const t = $("legs");
  const head = document.createElement("tr");
  for (const [h] of cols) { const th = document.createElement("th"); th.scope = "col"; th.textContent = h; head.appendChild(th); }
  const rows = [head];
  for (const l of p.legs) {
    const tr = document.createElement("tr");
    for (const [, f, kind] of cols) {
      const td = document.createElement("td"); td.textContent = f(l);
      if (kind === "t") td.className = "t";
      if (kind === "m") td.className = marginClass(l.buffet_margin_g, l.floor_g);
      tr.appendChild(td);
    }
    rows.push(tr);
  }
  t.replaceChildren(...rows);
  $("caution").textContent = p.caution;
}

async function submit(kind) {
  const req = request();
  if (kind === "assess") req.profile = $("f-profile").value.trim();
  status(kind === "assess" ? "Assessing..." : "Planning...");
  try {
    const t0 = performance.now();
    const ans = await api("POST", "/v1/" + kind, req);
    show(ans, ans.id);
    $("result-h").focus();
    status("Record " + ans.id + " kept, " + Math.round(performance.now() - t0) + " ms.");
    if (kind === "plan" && !$("f-profile").value) $("f-profile").value = ans.plan.profile;
    if (req.flight) history();
  } catch (e) {
    status(e.message, true);
  }
}

async function history() {
  const flight = $("f-flight").value.trim();
  const list = $("history-list");
  if (!flight) { status("Enter a flight number to see its records.", true); return; }
  try {
    const h = await api("GET", "/v1/plans?flight=" + encodeURIComponent(flight));
    list.replaceChildren();
    for (const r of h.records) {
      const li = document.createElement("li");
      li.textContent = r.created_at.slice(0, 19).replace("T", " ") + "Z " + r.kind + " " + r.profile + " cost " + f0(r.cost);
      const b = document.createElement("button"); b.type = "button"; b.textContent = "Show";
      b.setAttribute("aria-label", "Show record " + r.id);
      b.addEventListener("click", async () => {
        try { const rec = await api("GET", "/v1/plans/" + r.id); show(rec.output, rec.id); } catch (e) { status(e.message, true); }
      });
      li.appendChild(b);
      list.appendChild(li);
    }
    if (h.records.length === 0) { const li = document.createElement("li"); li.textContent = "No records yet."; list.appendChild(li); }
  } catch (e) { status(e.message, true); }
}

function fillDemo() {
  $("f-flight").value = "DEMO101";
  $("f-route").value = "route.geojson";
  $("f-aircraft").value = "demo-widebody";
  $("f-mass").value = "245000"; $("f-zfw").value = ""; $("f-fuel").value = "";
  $("f-ci").value = "40"; $("f-floor").value = "1.3"; $("f-speed").value = "econ";
  $("f-depart").value = "2026-12-01T20:00:00Z";
  $("f-weather").value = "weather.grib2";
}

document.addEventListener("DOMContentLoaded", async () => {
  $("plan-form").addEventListener("submit", (e) => { e.preventDefault(); submit("plan"); });
  $("assess-form").addEventListener("submit", (e) => { e.preventDefault(); submit("assess"); });
  $("demo-btn").addEventListener("click", fillDemo);
  $("history-btn").addEventListener("click", history);
  $("f-token").addEventListener("change", loadLists);
  const ok = await loadLists();
  if (ok && new URLSearchParams(location.search).get("demo") === "1") {
    fillDemo();
    $("plan-btn").click();
  }
});
