// The page only shows what the server computed (peakproof's own checker, formatter and plots).
// User text is only ever put into the page as text nodes (textContent), never as HTML.
"use strict";

(function () {
  const SEVERITY_RANK = { error: 0, warning: 1, note: 2 };
  const SEVERITY_ICON = { error: "✖", warning: "▲", note: "●" };
  const $ = (id) => document.getElementById(id);

  const state = { analysis: null, text: "", formatted: "", selected: null, block: null, plotUrl: null,
                  styles: [] };

  function el(tag, className, text) {
    const node = document.createElement(tag);
    if (className) node.className = className;
    if (text !== undefined && text !== null) node.textContent = String(text);
    return node;
  }

  function showError(message) {
    const box = $("alert");
    box.textContent = message;
    box.hidden = false;
  }

  function clearError() {
    $("alert").hidden = true;
    $("alert").textContent = "";
  }

  // the per-session token the server wrote into the page; every POST carries it
  const TOKEN = document.querySelector('meta[name="peakproof-token"]').content;

  async function postJSON(url, body) {
    const response = await fetch(url, {
      method: "POST",
      headers: { "Content-Type": "application/json", "X-Peakproof-Token": TOKEN },
      body: JSON.stringify(body),
    });
    return readAnswer(response);
  }

  async function readAnswer(response) {
    let payload = null;
    try {
      payload = await response.json();
    } catch (e) {
      payload = null;
    }
    if (!response.ok) {
      const why = payload && payload.error ? payload.error : `the server answered ${response.status}`;
      throw new Error(why);
    }
    return payload;
  }

  function worst(ids) {
    let best = "note";
    for (const id of ids) {
      const sev = state.analysis.findings[id].severity;
      if (SEVERITY_RANK[sev] < SEVERITY_RANK[best]) best = sev;
    }
    return best;
  }

  function severityLabel(severity) {
    return el("span", `sev-label sev-${severity}`, severity);
  }

  // ---- checking ------------------------------------------------------------------------
  async function runCheck() {
    const text = $("input").value;
    if (!text.trim()) {
      showError("Paste some characterization data first, or open a file.");
      return;
    }
    clearError();
    $("check-button").disabled = true;
    $("check-button").textContent = "Checking…";
    try {
      const analysis = await postJSON("/api/check", { text });
      state.analysis = analysis;
      state.text = text;
      state.selected = null;
      markStale();
      renderTotals();
      renderCompounds();
      renderMarked();
      renderFindings();
      renderCounts();
      $("detail").hidden = true;
      $("results").hidden = false;
      document.body.classList.add("checked");
      $("input").scrollTop = 0;
      await Promise.all([runFormat(), loadPlot()]);
    } catch (error) {
      showError(`Could not check the text: ${error.message}`);
    } finally {
      $("check-button").disabled = false;
      $("check-button").textContent = "Check data";
    }
  }

  function renderTotals() {
    const box = $("totals");
    box.replaceChildren();
    const totals = state.analysis.totals;
    for (const sev of ["error", "warning", "note"]) {
      const pill = el("span", `total sev-${sev}`);
      pill.append(el("span", "icon", SEVERITY_ICON[sev]), ` ${totals[sev]} ${sev}${totals[sev] === 1 ? "" : "s"}`);
      box.append(pill);
    }
  }

  function renderCompounds() {
    const select = $("compound-select");
    select.replaceChildren(el("option", "", "All compounds"));
    select.firstChild.value = "";
    for (const c of state.analysis.compounds) {
      const n = state.analysis.findings.filter((f) => f.block === c.block).length;
      const option = el("option", "", `${c.label} — line ${c.line}, ${n} finding${n === 1 ? "" : "s"}`);
      option.value = String(c.block);
      select.append(option);
    }
    const first = state.analysis.compounds.find((c) => c.has_1h);
    state.block = first ? first.block : null;
    select.value = "";
    $("compound-note").textContent = state.analysis.compounds.length
      ? `${state.analysis.compounds.length} data block(s) found`
      : "no data blocks found: is this NMR characterization data?";
  }

  function renderMarked() {
    const pre = $("marked");
    pre.replaceChildren();
    const seen = new Set();
    for (const seg of state.analysis.segments) {
      if (!seg.ids.length) {
        pre.append(document.createTextNode(seg.text));
        continue;
      }
      const sev = worst(seg.ids);
      const mark = el("mark", `finding sev-${sev}`);
      mark.textContent = seg.text;
      mark.dataset.ids = seg.ids.join(" ");
      mark.dataset.severity = sev;
      if (seg.point) mark.classList.add("point");
      const fresh = seg.ids.filter((id) => !seen.has(id));
      fresh.forEach((id) => seen.add(id));
      if (fresh.length) {
        mark.classList.add("first");
        mark.id = `mark-${fresh[0]}`;
      }
      const messages = seg.ids.map((id) => {
        const f = state.analysis.findings[id];
        return `${f.severity}: ${f.message}`;
      });
      mark.title = messages.join("\n");
      mark.setAttribute("aria-label", `${sev}: ${seg.text}`);
      mark.tabIndex = 0;
      mark.addEventListener("click", () => select(seg.ids[0], false));
      mark.addEventListener("keydown", (event) => {
        if (event.key === "Enter" || event.key === " ") {
          event.preventDefault();
          select(seg.ids[0], false);
        }
      });
      pre.append(mark);
    }
  }

  function visibleFindings() {
    const findings = state.analysis.findings;
    const chosen = $("compound-select").value;
    if (chosen === "") return findings;
    return findings.filter((f) => String(f.block) === chosen);
  }

  function renderFindings() {
    const list = $("findings-list");
    list.replaceChildren();
    const shown = visibleFindings();
    $("findings-count").textContent = `(${shown.length})`;
    if (!shown.length) {
      list.append(el("li", "empty", "No findings here."));
      return;
    }
    for (const f of shown) {
      const item = el("li", `finding-item sev-${f.severity}`);
      item.dataset.id = f.id;
      const head = el("div", "item-head");
      head.append(el("span", `icon sev-${f.severity}`, SEVERITY_ICON[f.severity]), severityLabel(f.severity),
                  el("span", "where", `line ${f.line}:${f.column}`), el("code", "rule", f.code || f.rule));
      const button = el("button", "item-button");
      button.type = "button";
      button.append(head, el("span", "message", f.message));
      button.addEventListener("click", () => select(f.id, true));
      item.append(button);
      list.append(item);
    }
  }

  function renderCounts() {
    const body = $("counts").tBodies[0];
    body.replaceChildren();
    for (const row of state.analysis.counts) {
      const tr = el("tr");
      const sev = el("td");
      sev.append(severityLabel(row.severity));
      tr.append(el("td", "rule-name", row.rule), el("td", "", row.code), sev, el("td", "num", row.count));
      body.append(tr);
    }
  }

  function select(id, scroll) {
    state.selected = id;
    const f = state.analysis.findings[id];
    document.querySelectorAll("mark.selected, li.selected").forEach((n) => n.classList.remove("selected"));
    document.querySelectorAll("#marked mark").forEach((m) => {
      if (m.dataset.ids.split(" ").includes(String(id))) m.classList.add("selected");
    });
    const item = document.querySelector(`#findings-list li[data-id="${id}"]`);
    if (item) item.classList.add("selected");
    if (scroll) {
      const mark = $(`mark-${id}`) || document.querySelector("#marked mark.selected");
      if (mark) mark.scrollIntoView({ block: "center", behavior: "smooth" });
    } else if (item) {
      item.scrollIntoView({ block: "nearest" });
    }
    renderDetail(f);
  }

  function renderDetail(f) {
    const box = $("detail");
    box.replaceChildren();
    box.className = `detail sev-${f.severity}`;
    const head = el("div", "item-head");
    head.append(el("span", `icon sev-${f.severity}`, SEVERITY_ICON[f.severity]), severityLabel(f.severity),
                el("code", "rule", `${f.rule}${f.code ? " · " + f.code : ""}`),
                el("span", "where", `line ${f.line}, column ${f.column}`));
    const close = el("button", "close", "×");
    close.type = "button";
    close.setAttribute("aria-label", "close");
    close.addEventListener("click", () => { box.hidden = true; });
    head.append(close);
    box.append(head, el("p", "message", f.message));
    if (f.suggestion) {
      const s = el("div", "suggestion");
      s.append(el("strong", "", "Suggestion: "), document.createTextNode(f.suggestion.description || ""));
      for (const r of f.suggestion.replace || []) {
        s.append(document.createTextNode(" → "), el("code", "replacement", r.text));
      }
      box.append(s);
    }
    if (f.hint) box.append(el("p", "hint", f.hint));
    if (f.rationale) {
      box.append(el("h4", "", "Why it matters"), el("p", "rationale", f.rationale));
    }
    if (f.source) box.append(el("p", "source muted", `Source: ${f.source}`));
    box.hidden = false;
  }

  // ---- formatting ----------------------------------------------------------------------
  async function loadStyles() {
    try {
      const response = await fetch("/api/styles");
      const payload = await readAnswer(response);
      state.styles = payload.styles;
      const select = $("style-select");
      select.replaceChildren();
      for (const s of payload.styles) {
        const option = el("option", "", s.name);
        option.value = s.name;
        select.append(option);
      }
      select.value = payload.default;
      describeStyle();
    } catch (error) {
      showError(`Could not load the styles: ${error.message}`);
    }
  }

  function describeStyle() {
    const chosen = state.styles.find((s) => s.name === $("style-select").value);
    $("style-description").textContent = chosen ? chosen.description : "";
  }

  // Results belong to the text of the last check; once the box differs they are marked out of
  // date and Copy is off, so nobody copies a mistake they have already fixed.
  function markStale() {
    const stale = Boolean(state.analysis) && $("input").value !== state.text;
    document.body.classList.toggle("stale", stale);
    $("stale-note").hidden = !stale;
    $("copy-button").disabled = stale;
    if (stale) $("copy-status").textContent = "";
  }

  async function runFormat() {
    if (!state.analysis) return;
    if ($("input").value !== state.text) {  // another style for edited text: check it first
      await runCheck();
      return;
    }
    describeStyle();
    $("copy-status").textContent = "";
    try {
      const result = await postJSON("/api/format", { text: state.text, style: $("style-select").value });
      state.formatted = result.text;
      $("formatted").textContent = result.text;
      renderDiff(result.diff);
    } catch (error) {
      state.formatted = "";
      $("formatted").textContent = "";
      renderDiff([]);
      showError(`Could not reformat: ${error.message}`);
    }
  }

  function renderDiff(rows) {
    const box = $("diff");
    box.replaceChildren();
    $("diff-count").textContent = `(${rows.length} line${rows.length === 1 ? "" : "s"})`;
    if (!rows.length) {
      box.append(el("p", "empty", "Nothing to change: the text is already in this style."));
      return;
    }
    for (const row of rows) {
      const line = el("div", "diff-row");
      line.append(el("span", "gutter", row.line === null ? "+" : row.line));
      const body = el("span", "diff-text");
      for (const part of row.parts) {
        if (part.op === "equal") body.append(document.createTextNode(part.text));
        else if (part.op === "cut") body.append(el("em", "diff-cut", part.text));
        else body.append(el(part.op === "del" ? "del" : "ins", "", part.text));
      }
      line.append(body);
      box.append(line);
    }
  }

  function showTab(which) {
    const diff = which === "diff";
    $("formatted").hidden = diff;
    $("diff").hidden = !diff;
    $("tab-result").setAttribute("aria-selected", String(!diff));
    $("tab-diff").setAttribute("aria-selected", String(diff));
  }

  async function copyResult() {
    const text = state.formatted;
    if (!text) return;
    let done = false;
    if (navigator.clipboard && window.isSecureContext) {
      try {
        await navigator.clipboard.writeText(text);
        done = true;
      } catch (e) {
        done = false;
      }
    }
    if (!done) {
      const scratch = el("textarea", "visually-hidden");
      scratch.value = text;
      document.body.append(scratch);
      scratch.select();
      try { done = document.execCommand("copy"); } catch (e) { done = false; }
      scratch.remove();
    }
    $("copy-status").textContent = done ? "Copied ✓" : "Could not copy: select the text and press Ctrl+C.";
  }

  // ---- the spectrum --------------------------------------------------------------------
  async function loadPlot() {
    const img = $("plot");
    const status = $("plot-status");
    const compound = state.analysis.compounds.find((c) => c.block === state.block);
    $("plot-compound").textContent = compound ? `compound ${compound.label} · choose another above` : "";
    if (!compound || !compound.has_1h) {
      img.hidden = true;
      status.hidden = false;
      status.textContent = compound ? `${compound.label} has no 1H NMR signals to draw.`
                                    : "Choose a compound with 1H NMR data.";
      return;
    }
    // the last compound's plot must not stay under the new heading while this one loads
    img.hidden = true;
    img.removeAttribute("src");
    status.hidden = false;
    status.textContent = "Simulating…";
    const request = (state.plotRequest = (state.plotRequest || 0) + 1);
    try {
      const response = await fetch("/api/plot", {
        method: "POST",
        headers: { "Content-Type": "application/json", "X-Peakproof-Token": TOKEN },
        body: JSON.stringify({ text: state.text, block: compound.block }),
      });
      if (!response.ok) await readAnswer(response);
      const blob = await response.blob();
      if (request !== state.plotRequest) return;  // a newer plot was asked for meanwhile
      if (state.plotUrl) URL.revokeObjectURL(state.plotUrl);
      state.plotUrl = URL.createObjectURL(blob);
      img.alt = `Simulated 1H NMR spectrum of ${compound.label}`;
      img.src = state.plotUrl;
      img.hidden = false;
      status.hidden = true;
    } catch (error) {
      if (request !== state.plotRequest) return;
      img.hidden = true;
      status.textContent = `Could not draw the spectrum: ${error.message}`;
    }
  }

  function chooseCompound() {
    const value = $("compound-select").value;
    renderFindings();
    if (value === "") return;
    state.block = Number(value);
    const compound = state.analysis.compounds.find((c) => c.block === state.block);
    if (compound) scrollToLine(compound.line);
    loadPlot();
  }

  function scrollToLine(line) {
    const pre = $("marked");
    const lineHeight = parseFloat(getComputedStyle(pre).lineHeight) || 20;
    // Lines wrap, so find the first mark or text at or after the block instead when possible.
    const marks = [...pre.querySelectorAll("mark")];
    const target = marks.find((m) => {
      const f = state.analysis.findings[Number(m.dataset.ids.split(" ")[0])];
      return f.block === state.block;
    });
    if (target) target.scrollIntoView({ block: "center", behavior: "smooth" });
    else pre.scrollTop = (line - 1) * lineHeight;
  }

  // ---- files ---------------------------------------------------------------------------
  async function openFile(event) {
    const file = event.target.files[0];
    if (!file) return;
    clearError();
    $("file-name").textContent = `Reading ${file.name}…`;
    const form = new FormData();
    form.append("file", file);
    try {
      const response = await fetch("/api/upload", {
        method: "POST", headers: { "X-Peakproof-Token": TOKEN }, body: form,
      });
      const payload = await readAnswer(response);
      $("input").value = payload.text;
      $("file-name").textContent = `${payload.name} (${payload.format})`;
      await runCheck();
    } catch (error) {
      $("file-name").textContent = "";
      showError(`Could not open ${file.name}: ${error.message}`);
    } finally {
      event.target.value = "";
    }
  }

  document.addEventListener("DOMContentLoaded", () => {
    $("check-button").addEventListener("click", runCheck);
    $("input").addEventListener("keydown", (event) => {
      if (event.key === "Enter" && (event.ctrlKey || event.metaKey)) runCheck();
    });
    $("file-input").addEventListener("change", openFile);
    $("input").addEventListener("input", markStale);
    $("style-select").addEventListener("change", runFormat);
    $("copy-button").addEventListener("click", copyResult);
    $("tab-result").addEventListener("click", () => showTab("result"));
    $("tab-diff").addEventListener("click", () => showTab("diff"));
    $("compound-select").addEventListener("change", chooseCompound);
    loadStyles();
  });
})();
