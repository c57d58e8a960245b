// The gateway's page: one card per match (or one match alone with ?match=ID, for an overlay)
// with the teams, the result-at-full-time bar, the to-advance bar where the format needs a
// winner, the shoot-out's kicks, and a chart that grows with every update. It loads what the
// gateway already knows over HTTP, then follows the WebSocket feed and reconnects if it drops.
// Nothing is shown as live unless the gateway hears serve and serve vouches for the match.
"use strict";

const params = new URLSearchParams(location.search);
const onlyMatch = params.has("match") ? Number(params.get("match")) : null;

const matches = new Map();  // match_id -> { latest, points, card }
const feedState = document.getElementById("feed-state");
const board = document.getElementById("matches");
const template = document.getElementById("match-template");
const SVG = "http://www.w3.org/2000/svg";

// Timeline points, as the gateway's /api/timeline sends them (protocol/README.md).
const P = { period: 0, clock: 1, home: 2, draw: 3, away: 4, goalsHome: 5, goalsAway: 6,
  redsHome: 7, redsAway: 8, advHome: 9, advAway: 10 };
const PERIOD_NUMBERS = { pre_match: 0, first_half: 1, second_half: 2, extra_first: 3,
  extra_second: 4, shootout: 5, finished: 6 };
const PERIOD_NAMES = ["before kick-off", "first half", "second half", "extra time, first half",
  "extra time, second half", "shoot-out", "finished"];
const STATUS_NAMES = { not_started: "not started", in_play: "in play", interval: "interval",
  shootout: "shoot-out", finished: "finished", abandoned: "abandoned" };

// What the gateway says of serve: "live", "waiting" (nothing heard yet), "lost" (silent past
// its limit), or "unreachable" (our own socket to the gateway is down).
let upstream = { state: "connecting", silentMs: 0 };

function percent(p) { return (p * 100).toFixed(1) + "%"; }

function teamsOf(u) {
  const m = u.match;
  return { home: (m && m.home) || "Home", away: (m && m.away) || "Away" };
}

function formatOf(u) {
  const f = (u && u.match && u.match.format) || {};
  return { half: f.half_minutes || 45, extraHalf: f.extra_half_minutes || 15 };
}

// Nominal [start, end) minutes of each period on the running clock; the shoot-out has no clock.
function periodBounds(format) {
  const h = format.half, e = format.extraHalf;
  return { 1: [0, h], 2: [h, 2 * h], 3: [2 * h, 2 * h + e], 4: [2 * h + e, 2 * h + 2 * e] };
}

function mmss(ms) {
  const seconds = Math.floor(ms / 1000);
  return `${Math.floor(seconds / 60)}:${String(seconds % 60).padStart(2, "0")}`;
}

// The match clock as a viewer reads it: 67:12, and in stoppage 45+2:13 or 90+4:05.
function clockText(u) {
  const period = PERIOD_NUMBERS[u.period] ?? 0;
  if (u.status === "interval") return "interval";
  if (u.status === "finished" || u.status === "abandoned") return STATUS_NAMES[u.status];
  if (period === 0) return "before kick-off";
  if (period === 5) return "shoot-out";
  if (period === 6) return "finished";
  const end = periodBounds(formatOf(u))[period][1];
  const over = u.clock_ms - end * 60000;
  return over > 0 ? `${end}+${mmss(over)}` : mmss(u.clock_ms);
}

// The decision of a knock-out once it is made: who advances and how.
function decisionText(u) {
  if (!u.to_advance || u.status !== "finished") return null;
  const names = teamsOf(u);
  const side = u.to_advance.home >= 1 ? "home" : u.to_advance.away >= 1 ? "away" : null;
  if (!side) return null;
  let how = "";
  if (u.shootout) how = ` on penalties ${u.shootout.home.scored}–${u.shootout.away.scored}`;
  else if (u.full_time.draw >= 1) how = " after extra time";
  else if (u.match && u.match.format && u.match.format.first_leg) how = " on aggregate";
  return { side, text: `${names[side]} advance${how}` };
}

// A chart point in the layout of the gateway's timeline endpoint.
function pointOf(u) {
  const adv = u.to_advance;
  return [PERIOD_NUMBERS[u.period] ?? 0, u.clock_ms, u.full_time.home, u.full_time.draw,
    u.full_time.away, u.score.home, u.score.away, u.red_cards.home, u.red_cards.away,
    adv ? adv.home : null, adv ? adv.away : null];
}

function cardFor(id) {
  let entry = matches.get(id);
  if (entry) return entry;
  const card = template.content.firstElementChild.cloneNode(true);
  card.dataset.matchId = String(id);
  card.querySelector(".match-title").textContent = `Match ${id}`;
  entry = { latest: null, points: [], card };
  matches.set(id, entry);
  // Keep cards in match-id order.
  const later = [...board.querySelectorAll(".match")].find((c) => Number(c.dataset.matchId) > id);
  board.insertBefore(card, later || null);
  document.getElementById("empty").hidden = true;
  return entry;
}

function wanted(id) { return onlyMatch === null || id === onlyMatch; }

function accept(update) {
  if (!wanted(update.match_id)) return;
  const entry = cardFor(update.match_id);
  if (entry.latest && update.update_seq <= entry.latest.update_seq) return;  // older than shown
  entry.latest = update;
  entry.points.push(pointOf(update));
  draw(entry);
}

function setText(card, selector, text) { card.querySelector(selector).textContent = text; }

function draw(entry) {
  const u = entry.latest;
  const card = entry.card;
  const names = teamsOf(u);
  card.dataset.updateSeq = String(u.update_seq);
  card.dataset.status = u.status;
  setText(card, ".match-title", u.match ? `${names.home} v ${names.away}` : `Match ${u.match_id}`);
  setText(card, ".competition", detailsText(u));
  setText(card, ".status", STATUS_NAMES[u.status] || u.status);
  setText(card, ".team-home", names.home);
  setText(card, ".team-away", names.away);
  setText(card, ".score", `${u.score.home} – ${u.score.away}`);
  setText(card, ".reds-home", "▮".repeat(u.red_cards.home));
  setText(card, ".reds-away", "▮".repeat(u.red_cards.away));
  const clock = card.querySelector(".clock");
  clock.textContent = clockText(u);
  clock.dataset.clockMs = String(u.clock_ms);
  clock.title = PERIOD_NAMES[PERIOD_NUMBERS[u.period] ?? 0];
  drawBar(card, "full", u.full_time, ["home", "draw", "away"], names);
  const advance = card.querySelector(".advance");
  advance.hidden = !u.to_advance;
  if (u.to_advance) drawBar(card, "adv", u.to_advance, ["home", "away"], names);
  const decision = decisionText(u);
  const banner = card.querySelector(".decision");
  banner.hidden = !decision;
  banner.dataset.winner = decision ? decision.side : "";
  banner.textContent = decision ? decision.text : "";
  drawShootout(card, u, names);
  drawStale(entry);
  drawTimeline(card.querySelector(".timeline"), entry.points, formatOf(u), !!u.to_advance);
  drawLegend(card.querySelector(".legend"), names, !!u.to_advance);
  noteLayout();
}

function detailsText(u) {
  const m = u.match;
  if (!m) return "";
  const parts = [];
  if (m.competition) parts.push(m.competition);
  if (m.kickoff_us) {
    parts.push(new Date(m.kickoff_us / 1000).toLocaleString(undefined,
      { weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" }));
  }
  if (m.neutral_venue) parts.push("neutral venue");
  if (m.format && m.format.first_leg) {
    parts.push(`first leg ${m.format.first_leg.home}–${m.format.first_leg.away}`);
  }
  return parts.join(" · ");
}

// One bar of probabilities with its figures: `kind` "full" (result at full time) or "adv".
function drawBar(card, kind, p, sides, names) {
  const labels = { home: names.home, draw: "Draw", away: names.away };
  for (const side of sides) {
    const figure = card.querySelector(`.${kind}-${side}`);
    figure.textContent = percent(p[side]);
    figure.dataset.value = String(p[side]);  // exact, as published
    card.querySelector(`.${kind}-seg-${side}`).style.width = `${p[side] * 100}%`;
    const label = card.querySelector(`.${kind}-label-${side}`);
    if (label) label.textContent = side === "draw" ? "Draw" : kind === "adv" ? labels[side]
      : `${labels[side]} win`;
  }
  card.querySelector(`.${kind}-bar`).setAttribute("aria-label",
    sides.map((s) => `${labels[s]} ${percent(p[s])}`).join(", "));
}

// The shoot-out's kicks in order for each side: filled scored, hollow missed.
function drawShootout(card, u, names) {
  const box = card.querySelector(".shootout");
  box.hidden = !u.shootout;
  if (!u.shootout) return;
  for (const side of ["home", "away"]) {
    const row = box.querySelector(`.kicks-${side}`);
    const kicks = u.shootout[side].kicks;
    row.dataset.kicks = kicks.map((k) => (k ? "1" : "0")).join("");
    row.querySelector(".kicks-team").textContent =
      names[side] + (u.shootout.first === side ? " (first)" : "");
    row.querySelector(".kicks-marks").textContent = kicks.map((k) => (k ? "●" : "○")).join(" ");
    row.querySelector(".kicks-count").textContent =
      `${u.shootout[side].scored}/${u.shootout[side].taken}`;
  }
}

// Why the card's figures cannot be vouched for, if they cannot: serve not heard, the match's
// feed silent during play, or its journal failing.
function staleReasons(u) {
  const reasons = [];
  if (upstream.state !== "live") reasons.push("upstream");
  if (u.feed_stale) reasons.push("feed");
  if (u.journal_failing) reasons.push("journal");
  return reasons;
}
const STALE_TEXT = { upstream: "service not heard", feed: "match feed silent",
  journal: "journal failing" };

function drawStale(entry) {
  const card = entry.card;
  const reasons = entry.latest ? staleReasons(entry.latest) : ["upstream"];
  card.dataset.stale = reasons.join(" ");
  const badge = card.querySelector(".stale");
  badge.hidden = reasons.length === 0;
  badge.textContent = reasons.length ? `stale: ${reasons.map((r) => STALE_TEXT[r]).join(", ")}` : "";
}

function svg(name, attributes, parent) {
  const node = document.createElementNS(SVG, name);
  for (const [k, v] of Object.entries(attributes)) node.setAttribute(k, String(v));
  parent.appendChild(node);
  return node;
}

// The chart's time axis: each period has its own stretch, as long as its nominal time plus the
// stoppage seen in it, so stoppage never overlaps the next period. Regulation always shows;
// extra time and the shoot-out once reached. Returns the x of every point, the period
// stretches and the total length in display minutes.
function timeAxis(points, format) {
  const bounds = periodBounds(format);
  const reached = Math.max(0, ...points.map((pt) => (pt[P.period] === 6 ? 0 : pt[P.period])));
  const wentToExtra = points.some((pt) => pt[P.period] >= 3 && pt[P.period] <= 5);
  const last = wentToExtra ? Math.max(4, reached) : 2;
  const stretches = [];
  let at = 0;
  for (let period = 1; period <= last; period++) {
    if (period === 5) {
      stretches.push({ period, from: at, nominal: 0, over: 0, length: 10, start: null });
      at += 10;
      continue;
    }
    const [start, end] = bounds[period];
    const over = Math.max(0, ...points.filter((pt) => pt[P.period] === period)
      .map((pt) => pt[P.clock] / 60000 - end));
    stretches.push({ period, from: at, nominal: end - start, over, length: end - start + over, start });
    at += end - start + over;
  }
  const shootoutPoints = points.filter((pt) => pt[P.period] === 5);
  let shootoutIndex = 0;
  const xs = points.map((pt) => {
    const period = pt[P.period];
    if (period === 0) return 0;
    if (period === 6) return at;
    const s = stretches.find((st) => st.period === period);
    if (!s) return at;
    if (period === 5) return s.from + s.length * (++shootoutIndex) / (shootoutPoints.length + 1);
    return s.from + Math.min(Math.max(pt[P.clock] / 60000 - s.start, 0), s.length);
  });
  return { xs, stretches, length: at, wentToExtra };
}

// Whether a point's lines mean "to advance" (extra time on, in a format needing a winner) or
// "result at full time" (regulation). `wentToExtra`: the match reached extra time.
function meansAdvance(pt, wentToExtra) {
  if (pt[P.advHome] === null || pt[P.advHome] === undefined) return false;
  const period = pt[P.period];
  return (period >= 3 && period <= 5) || (period === 6 && wentToExtra);
}

function drawTimeline(chart, points, format, knockout) {
  chart.replaceChildren();
  const left = 50, right = 592, top = 18, bottom = 150;
  const axis = timeAxis(points, format);
  const x = (minutes) => left + (right - left) * minutes / axis.length;
  const y = (p) => bottom - (bottom - top) * p;
  // y-axis: probability with gridlines every 25%.
  svg("line", { class: "axis", x1: left, x2: left, y1: top, y2: bottom }, chart);
  for (const p of [0, 0.25, 0.5, 0.75, 1]) {
    svg("line", { class: "grid", x1: left, x2: right, y1: y(p), y2: y(p) }, chart);
    svg("text", { class: "axis-label", x: left - 5, y: y(p) + 4, "text-anchor": "end" }, chart)
      .textContent = `${p * 100}%`;
  }
  svg("line", { class: "axis", x1: left, x2: right, y1: bottom, y2: bottom }, chart);
  // x-axis: every 15 minutes of nominal time; stoppage shaded and labelled "45+N" at its end.
  for (const s of axis.stretches) {
    if (s.period === 5) {
      svg("rect", { class: "shootout-zone", x: x(s.from), y: top, width: x(s.from + s.length) - x(s.from),
        height: bottom - top }, chart);
      svg("text", { class: "axis-label", x: x(s.from + s.length / 2), y: bottom + 14,
        "text-anchor": "middle" }, chart).textContent = "pens";
      continue;
    }
    const step = s.nominal > 20 ? 15 : s.nominal;
    for (let m = 0; m <= s.nominal; m += step) {
      const at = x(s.from + m);
      svg("line", { class: "grid", x1: at, x2: at, y1: top, y2: bottom }, chart);
      if (m === 0 && s.period !== 1) continue;  // the previous stretch labels its end
      svg("text", { class: "axis-label", x: at, y: bottom + 14, "text-anchor": "middle" }, chart)
        .textContent = `${s.start + m}'`;
    }
    if (s.over > 0) {
      const from = x(s.from + s.nominal), to = x(s.from + s.length);
      svg("rect", { class: "stoppage", x: from, y: top, width: to - from, height: bottom - top }, chart);
      svg("text", { class: "stoppage-label", x: (from + to) / 2, y: top + 10, "text-anchor": "middle" },
        chart).textContent = `+${Math.ceil(s.over)}`;
    }
  }
  // Where the lines change meaning: full time -> to advance (extra time) -> shoot-out.
  if (knockout) {
    for (const s of axis.stretches) {
      if (s.period !== 3 && s.period !== 5) continue;
      const at = x(s.from);
      svg("line", { class: "meaning", x1: at, x2: at, y1: top - 12, y2: bottom }, chart);
      svg("text", { class: "meaning-label", x: at + 3, y: top - 5 }, chart).textContent =
        s.period === 3 ? "to advance →" : "shoot-out →";
    }
  }
  const lines = { home: [[]], draw: [[]], away: [[]] };
  points.forEach((pt, i) => {
    const advance = meansAdvance(pt, axis.wentToExtra);
    const px = x(axis.xs[i]).toFixed(1);
    for (const side of ["home", "draw", "away"]) {
      const runs = lines[side];
      const value = advance ? (side === "draw" ? null : pt[side === "home" ? P.advHome : P.advAway])
        : pt[P[side]];
      const run = runs[runs.length - 1];
      if (value === null) { if (run.length) runs.push([]); continue; }
      if (run.length && run.advance !== advance) {  // a new meaning: a new, dashed run
        const next = [];
        runs.push(next);
        next.advance = advance;
        next.push(`${px},${y(value).toFixed(1)}`);
        continue;
      }
      run.advance = advance;
      run.push(`${px},${y(value).toFixed(1)}`);
    }
  });
  for (const [side, runs] of Object.entries(lines)) {
    for (const run of runs) {
      if (!run.length) continue;
      svg("polyline", { class: `line line-${side}${run.advance ? " line-advance" : ""}`,
        points: run.join(" ") }, chart);
    }
  }
  // A goal or a red card is where the score or the card count goes up between two points.
  for (let i = 1; i < points.length; i++) {
    const [prev, cur] = [points[i - 1], points[i]];
    const at = x(axis.xs[i]);
    if (cur[P.goalsHome] > prev[P.goalsHome]) svg("circle", { class: "goal goal-home", cx: at, cy: 178, r: 5 }, chart);
    if (cur[P.goalsAway] > prev[P.goalsAway]) svg("circle", { class: "goal goal-away", cx: at, cy: 178, r: 5 }, chart);
    if (cur[P.redsHome] > prev[P.redsHome]) svg("rect", { class: "red red-home", x: at - 3, y: 173, width: 6, height: 10 }, chart);
    if (cur[P.redsAway] > prev[P.redsAway]) svg("rect", { class: "red red-away", x: at - 3, y: 173, width: 6, height: 10 }, chart);
  }
}

function drawLegend(legend, names, knockout) {
  const key = (cls, text) => `<span class="key ${cls}"></span>${escapeHtml(text)} `;
  legend.innerHTML = key("key-home", `${names.home} win`) + key("key-draw", "draw") +
    key("key-away", `${names.away} win`) +
    (knockout ? key("key-advance", "after the marker: to advance") : "") +
    `· <span class="mark-goal">●</span> goal <span class="mark-red">▮</span> red card`;
}

function escapeHtml(text) {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

// The page's width against the viewport's, kept on the root element so a test reading the DOM
// can check nothing overflows sideways.
function noteLayout() {
  const root = document.documentElement;
  root.dataset.scrollWidth = String(root.scrollWidth);
  root.dataset.viewportWidth = String(window.innerWidth);
}
window.addEventListener("resize", noteLayout);

function showUpstream(state, silentMs = 0) {
  upstream = { state, silentMs };
  feedState.dataset.state = state;
  feedState.textContent = {
    live: "live",
    waiting: "waiting for the service · figures stale",
    lost: `service silent ${Math.round(silentMs / 1000)} s · figures stale`,
    unreachable: "gateway unreachable, retrying · figures stale",
    connecting: "connecting…",
  }[state] || `${state} · figures stale`;
  document.body.dataset.upstream = state;
  for (const entry of matches.values()) if (entry.latest) drawStale(entry);
}

async function loadKnownState() {
  const state = await (await fetch("/api/matches", { cache: "no-store" })).json();
  for (const update of state.matches) {
    if (!wanted(update.match_id)) continue;
    const entry = cardFor(update.match_id);
    const timeline = await (await fetch(`/api/timeline?match=${update.match_id}`,
      { cache: "no-store" })).json();
    if (entry.latest && entry.latest.update_seq >= update.update_seq) continue;  // feed was first
    entry.latest = update;
    entry.points = timeline.points.length ? timeline.points : [pointOf(update)];  // ends with it
    draw(entry);
  }
}

let retryMs = 500;
function follow() {
  const scheme = location.protocol === "https:" ? "wss" : "ws";
  const socket = new WebSocket(`${scheme}://${location.host}/feed`);
  let toldUpstream = false;
  socket.onopen = () => {
    retryMs = 500;
    showUpstream("connecting");
    socket.send(JSON.stringify({ watch: onlyMatch === null ? "all" : [onlyMatch] }));
  };
  socket.onmessage = (event) => {
    const message = JSON.parse(event.data);
    if (message.kind === "update") {
      accept(message);
    } else if (message.kind === "upstream") {
      toldUpstream = true;
      showUpstream(message.state, message.silent_ms || 0);
    } else if (message.kind === "watching" && !toldUpstream) {
      // The gateway tells a new client serve's state before answering anything when serve is
      // not heard; an answer with nothing before it means serve is heard.
      toldUpstream = true;
      showUpstream("live");
    }
  };
  socket.onclose = () => {
    showUpstream("unreachable");
    setTimeout(follow, retryMs);
    retryMs = Math.min(retryMs * 2, 10000);
  };
}

if (onlyMatch !== null) {
  document.body.classList.add("single");
  document.getElementById("empty").textContent = `Match ${onlyMatch} is not known yet.`;
}
noteLayout();
loadKnownState()
  .catch((error) => console.error("loading state:", error))
  .finally(() => {
    document.body.dataset.loaded = "1";
    follow();
  });
