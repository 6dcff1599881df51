"""The stylesheet of the HTML report, inlined into every page (no file is fetched)."""

CSS = """
:root{--ink:#18181b;--muted:#52525b;--line:#d4d4d8;--panel:#fafafa;
--err:#991b1b;--err-bg:#fee2e2;--warn:#854d0e;--warn-bg:#fef3c7;--note:#1e3a8a;--note-bg:#dbeafe;
--derived:#1e3a8a;--derived-bg:#eff6ff;--conflict:#991b1b;--conflict-bg:#fee2e2}
*{box-sizing:border-box}
body{margin:0;padding:1.5rem clamp(1rem,3vw,2.5rem);color:var(--ink);background:#fff;
font:15px/1.5 system-ui,-apple-system,"Segoe UI",Roboto,"Helvetica Neue",Arial,sans-serif}
h1{font-size:1.6rem;margin:0 0 .25rem}h2{font-size:1.3rem;margin:0 0 .2rem}
h3{font-size:1.05rem;margin:1.4rem 0 .5rem;border-bottom:1px solid var(--line);padding-bottom:.2rem}
code,.mono{font-family:ui-monospace,"SFMono-Regular",Menlo,Consolas,"DejaVu Sans Mono",monospace;font-size:.9em}
.summary{color:var(--muted);margin:.2rem 0 1rem}
.vh{position:absolute!important;width:1px;height:1px;margin:-1px;padding:0;border:0;overflow:hidden;
clip:rect(0 0 0 0);clip-path:inset(50%);white-space:nowrap}
.caution{border:3px solid #b45309;background:#fffbeb;border-radius:6px;padding:.8rem 1rem;margin:0 0 1.2rem}
.caution h2{color:#92400e;font-size:1.15rem}
.caution p{margin:.35rem 0}
.notice{border-left:4px solid var(--muted);background:var(--panel);padding:.5rem .8rem;margin:0 0 1rem}
nav ol{margin:.2rem 0 1rem;padding-left:1.4rem}
.file{border-top:2px solid var(--ink);padding-top:1rem;margin-top:1.5rem}
.path{margin:0;color:var(--muted)}
.counts{margin:.2rem 0 0;color:var(--muted)}
ol.findings{list-style:none;padding:0;margin:0}
.finding{border:1px solid var(--line);border-left-width:5px;border-radius:4px;padding:.45rem .7rem;margin:.45rem 0}
.finding.error{border-left-color:var(--err)}.finding.warning{border-left-color:#ca8a04}
.finding.note{border-left-color:#3b82f6}
.finding .head{display:flex;flex-wrap:wrap;gap:.5rem;align-items:baseline}
.badge{font-weight:700;font-size:.8rem;text-transform:uppercase;letter-spacing:.03em;padding:.05rem .45rem;border-radius:3px}
.badge.error{color:var(--err);background:var(--err-bg)}.badge.warning{color:var(--warn);background:var(--warn-bg)}
.badge.note{color:var(--note);background:var(--note-bg)}
.rule{font-weight:600}
.msg{margin:.3rem 0}
.meta{margin:.2rem 0;color:var(--muted);font-size:.9rem}
details{margin:.25rem 0 0;font-size:.92rem}
details summary{cursor:pointer;color:var(--muted)}
details p{margin:.35rem 0}
details pre{background:var(--panel);border:1px solid var(--line);padding:.4rem .6rem;margin:.2rem 0;overflow-x:auto}
.legend{font-size:.9rem;color:var(--muted);margin:.2rem 0 .5rem}
.legend>span{display:inline-block;padding:0 .4rem;margin-right:.4rem;border:1px solid var(--line);border-radius:3px}
.scroll{position:relative;overflow-x:auto;max-width:100%;border:1px solid var(--line);border-radius:4px;margin:0 0 .8rem}
.msg,.path,.where,figcaption,.notice,.legend{overflow-wrap:anywhere}
table.sheet{border-collapse:collapse;font-size:.84rem;font-variant-numeric:tabular-nums}
table.sheet caption{text-align:left;padding:.3rem .5rem;color:var(--muted);caption-side:top}
table.sheet th,table.sheet td{border-bottom:1px solid #e4e4e7;padding:.2rem .55rem;text-align:right;white-space:nowrap;vertical-align:top}
table.sheet thead th{position:sticky;top:0;background:#f4f4f5;border-bottom:2px solid var(--line);text-align:right}
table.sheet th[scope=row]{text-align:left;font-weight:600;background:#fff;position:sticky;left:0;z-index:1;
box-shadow:1px 0 0 var(--line)}
table.sheet thead th:first-child{text-align:left;left:0;z-index:2}
.c-stated{font-weight:600}
.c-derived{color:var(--derived);background:var(--derived-bg)}
.c-conflict{color:var(--conflict);background:var(--conflict-bg);font-weight:700;outline:2px solid var(--conflict);outline-offset:-2px}
.mark{display:inline-block;min-width:.8em;font-weight:700;margin-right:.15rem}
.implied{display:block;font-weight:400;font-size:.8rem}
.c-stated.c-inherited{font-weight:400;color:var(--muted)}
td.verdict{text-align:left;font-weight:600}td.v-error{color:var(--err)}td.v-warning{color:var(--warn)}
.assumed{font-weight:400;font-style:italic;color:var(--muted)}
figure{margin:.6rem 0 1rem}
figure svg{display:block;width:100%;max-width:52rem;height:auto}
figcaption{font-size:.88rem;color:var(--muted);margin-top:.2rem}
footer{margin-top:2rem;color:var(--muted);font-size:.85rem;border-top:1px solid var(--line);padding-top:.5rem}
@media print{.scroll{overflow:visible;border:0}details{display:block}body{padding:0}}
"""
