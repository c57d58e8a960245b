// The gateway's page: one card per match with the three full-time probabilities as a bar and
// as figures, the clock, and a chart that grows with every update. It loads what the gateway
// already knows over HTTP, then follows the WebSocket feed; it reconnects if the feed drops.
"use strict";

const matches = new Map();  // match_id -> { latest, points, card }
const feedState = document.getElementById("feed-state");
const board = document.getElementById("matches");
const template = document.getElementById("match-template");
const SVG = "http://www.w3.org/2000/svg";

const PERIOD_NAMES = {
  pre_match: "before kick-off", first_half: "first half", second_half: "second half",
  extra_first: "extra time, first half", extra_second: "extra time, second half",
  shootout: "penalty shoot-out", finished: "full time",
};
const PERIOD_NUMBERS = { pre_match: 0, first_half: 1, second_half: 2, extra_first: 3,
  extra_second: 4, shootout: 5, finished: 6 };

function percent(p) { return (p * 100).toFixed(1) + "%"; }

function clockText(ms) {
  const seconds = Math.floor(ms / 1000);
  const mm = Math.floor(seconds / 60);
  const ss = seconds % 60;
  return `${mm}:${String(ss).padStart(2, "0")}`;
}

// A chart point in the layout the gateway's timeline endpoint uses.
function pointOf(u) {
  return [PERIOD_NUMBERS[u.period] ?? 0, u.clock_ms, u.full_time.home, u.full_time.draw,
    u.full_time.away, u.score.home, u.score.away, u.red_cards.home, u.red_cards.away];
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

function accept(update) {
  const entry = cardFor(update.match_id);
  if (entry.latest && update.update_seq <= entry.latest.update_seq) return;  // older than shown
  entry.latest = update;
  entry.points.push(pointOf(update));
  draw(entry);
}

function draw(entry) {
  const u = entry.latest;
  const card = entry.card;
  card.dataset.updateSeq = String(u.update_seq);
  card.dataset.status = u.status;
  card.querySelector(".status").textContent = u.status.replace("_", " ");
  card.querySelector(".score").textContent = `${u.score.home} – ${u.score.away}`;
  card.querySelector(".reds-home").textContent = "▮".repeat(u.red_cards.home);
  card.querySelector(".reds-away").textContent = "▮".repeat(u.red_cards.away);
  const clock = card.querySelector(".clock");
  clock.textContent = `${clockText(u.clock_ms)} · ${PERIOD_NAMES[u.period] || u.period}`;
  clock.dataset.clockMs = String(u.clock_ms);
  const p = u.full_time;
  for (const side of ["home", "draw", "away"]) {
    const figure = card.querySelector(`.p-${side}`);
    figure.textContent = percent(p[side]);
    figure.dataset.value = String(p[side]);  // exact, as published
    card.querySelector(`.seg-${side}`).style.width = `${p[side] * 100}%`;
  }
  card.querySelector(".bar").setAttribute("aria-label",
    `home ${percent(p.home)}, draw ${percent(p.draw)}, away ${percent(p.away)}`);
  drawTimeline(card.querySelector(".timeline"), entry.points);
}

function svg(name, attributes, parent) {
  const node = document.createElementNS(SVG, name);
  for (const [k, v] of Object.entries(attributes)) node.setAttribute(k, String(v));
  parent.appendChild(node);
  return node;
}

// x: match minutes (at least 90), y: probability 0..1; marks under the plot.
function drawTimeline(chart, points) {
  chart.replaceChildren();
  const left = 34, right = 592, top = 8, bottom = 148;
  const lastMinute = points.length ? points[points.length - 1][1] / 60000 : 0;
  const span = Math.max(90, Math.ceil(lastMinute / 15) * 15);
  const x = (ms) => left + (right - left) * Math.min(ms / 60000, span) / span;
  const y = (p) => bottom - (bottom - top) * p;
  for (let m = 0; m <= span; m += 15) {
    svg("line", { class: "grid", x1: x(m * 60000), x2: x(m * 60000), y1: top, y2: bottom }, chart);
    svg("text", { class: "axis-label", x: x(m * 60000) - 6, y: bottom + 12 }, chart).textContent = `${m}'`;
  }
  for (const p of [0, 0.5, 1]) {
    svg("line", { class: "grid", x1: left, x2: right, y1: y(p), y2: y(p) }, chart);
    svg("text", { class: "axis-label", x: 2, y: y(p) + 4 }, chart).textContent = `${p * 100}%`;
  }
  ["home", "draw", "away"].forEach((side, k) => {
    const path = points.map((pt) => `${x(pt[1]).toFixed(1)},${y(pt[2 + k]).toFixed(1)}`).join(" ");
    svg("polyline", { class: `line line-${side}`, points: path }, chart);
  });
  // A goal or a red card is where the score or the card count goes up between two points.
  for (let i = 1; i < points.length; i++) {
    const [prev, cur] = [points[i - 1], points[i]];
    const at = x(cur[1]);
    if (cur[5] > prev[5]) svg("circle", { class: "goal", cx: at, cy: 166, r: 5, fill: "var(--home)" }, chart);
    if (cur[6] > prev[6]) svg("circle", { class: "goal", cx: at, cy: 166, r: 5, fill: "var(--away)" }, chart);
    if (cur[7] > prev[7]) svg("rect", { class: "red", x: at - 3, y: 160, width: 6, height: 10, stroke: "var(--home)" }, chart);
    if (cur[8] > prev[8]) svg("rect", { class: "red", x: at - 3, y: 160, width: 6, height: 10, stroke: "var(--away)" }, chart);
  }
}

async function loadKnownState() {
  const state = await (await fetch("/api/matches", { cache: "no-store" })).json();
  for (const update of state.matches) {
    const entry = cardFor(update.match_id);
    const timeline = await (await fetch(`/api/timeline?match=${update.match_id}`)).json();
    if (entry.latest && entry.latest.update_seq >= update.update_seq) continue;  // feed was first
    entry.latest = update;
    entry.points = timeline.points.length ? timeline.points : [pointOf(update)];  // ends with it
    draw(entry);
  }
}

let retryMs = 500;
function follow() {
  const socket = new WebSocket(`ws://${location.host}/feed`);
  socket.onopen = () => {
    retryMs = 500;
    feedState.dataset.state = "live";
    feedState.textContent = "live";
    socket.send(JSON.stringify({ watch: "all" }));
  };
  socket.onmessage = (event) => {
    const message = JSON.parse(event.data);
    if (message.kind === "update") accept(message);
  };
  socket.onclose = (event) => {
    feedState.dataset.state = "lost";
    feedState.textContent = `feed lost (${event.code}), retrying…`;
    setTimeout(follow, retryMs);
    retryMs = Math.min(retryMs * 2, 10000);
  };
}

loadKnownState()
  .catch((error) => console.error("loading state:", error))
  .finally(() => {
    document.body.dataset.loaded = "1";
    follow();
  });
