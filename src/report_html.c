/* report_html.c: the analysis report as one self-contained HTML page: the text
 * report's sections, tables, notes and caution, with the pictures as inline SVG. One
 * stylesheet inside the page (screen, narrow screens, print); no script, no external
 * reference. Deterministic bytes. */
#include <string.h>

#include "avow/render.h"
#include "doc.h"
#include "report.h"

static const char style[] =
    ":root{--ink:#1b2b3a;--muted:#5a6978;--rule:#d9e0e6;--accent:#0b5d66;--warn:#9c4a06;--band:#f2f5f7}\n"
    "*{box-sizing:border-box}\n"
    "html{-webkit-text-size-adjust:100%;text-size-adjust:100%}\n"
    "body{margin:0;background:#fff;color:var(--ink);"
    "font:16px/1.5 \"DejaVu Sans\",Verdana,Arial,sans-serif}\n"
    "header,main{max-width:60rem;margin:0 auto;padding:0 1rem}\n"
    "header{padding-top:1.4rem;padding-bottom:.8rem;border-bottom:4px solid var(--accent)}\n"
    ".tool{margin:0;color:var(--muted);font-size:.8rem;letter-spacing:.06em;text-transform:uppercase}\n"
    "h1{font-size:1.55rem;line-height:1.25;margin:.3rem 0 0}\n"
    "main{padding-bottom:3rem}\n"
    "h2{font-size:1.2rem;line-height:1.3;margin:2.2rem 0 .7rem;padding-bottom:.25rem;"
    "border-bottom:1px solid var(--rule)}\n"
    "h3{font-size:1rem;margin:1.3rem 0 .4rem}\n"
    "p,li,h2,h3{overflow-wrap:break-word}\n"
    "p{margin:.35rem 0}\n"
    "p.i2{margin-left:1.4rem;color:#2d3e4e}\n"
    ".scroll{max-width:100%;overflow-x:auto;margin:.6rem 0}\n"
    "table{border-collapse:collapse;font-size:.9rem;font-variant-numeric:tabular-nums}\n"
    "th,td{padding:.28rem .65rem;text-align:left;vertical-align:top;white-space:nowrap;"
    "border-bottom:1px solid var(--rule)}\n"
    "thead th{border-bottom:2px solid var(--ink);font-weight:bold}\n"
    "th.r,td.r{text-align:right}\n"
    ".sub{padding-left:1.6rem}\n"
    "table.kv th{font-weight:normal;color:var(--muted)}\n"
    "table.kv td{white-space:normal;overflow-wrap:anywhere;min-width:12rem}\n"
    "pre{margin:0;padding:.7rem .9rem;background:var(--band);"
    "font:.85rem/1.45 \"DejaVu Sans Mono\",Menlo,Consolas,monospace}\n"
    "figure{margin:1rem 0 1.4rem;max-width:100%;overflow-x:auto}\n"
    "figure svg{display:block;width:100%;max-width:720px;height:auto;border:1px solid var(--rule)}\n"
    "figcaption{margin-top:.4rem;font-size:.9rem;color:#2d3e4e;max-width:45rem}\n"
    "ul.notes{padding-left:1.3rem}\n"
    "ul.notes li{margin:.4rem 0}\n"
    "li.caution{list-style:none;margin-left:-1.3rem;padding:.7rem .9rem;border-left:5px solid var(--warn);"
    "background:#fbf1e6;font-weight:bold}\n"
    "@media (max-width:40rem){body{font-size:15px}h1{font-size:1.3rem}th,td{padding:.22rem .45rem}"
    "p.i2{margin-left:.8rem}figure svg{min-width:36rem}"
    "table.kv,table.kv tbody,table.kv tr,table.kv th,table.kv td{display:block}"
    "table.kv th{border-bottom:none;padding-bottom:0;white-space:normal}"
    "table.kv td{min-width:0;padding-top:.05rem}table.kv .sub{padding-left:1.1rem}}\n"
    "@media print{body{font-size:10pt}header,main{max-width:none;padding:0}"
    ".scroll{overflow:visible}table{font-size:8.5pt}th,td{padding:.1rem .35rem;white-space:normal;"
    "overflow-wrap:anywhere}"
    "pre{white-space:pre-wrap;background:none;border:1px solid #888;font-size:8pt}"
    "h2{break-after:avoid}figure,pre,tr,li.caution{break-inside:avoid}"
    "figure{overflow:visible}figure svg{border:none;min-width:0}li.caution{background:none;border:2px solid #000}}\n";

void render_report_html(const avow_ctx *ctx, const avow_plan *p, const avow_results *r, strbuf *o)
{
    sb_puts(o, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
               "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n");
    sb_printf(o, "<meta name=\"generator\" content=\"avow %s\">\n<title>", AVOW_VERSION);
    html_escape(o, p->title, strlen(p->title));
    sb_puts(o, " - avow analysis report</title>\n<style>\n");
    sb_puts(o, style);
    sb_puts(o, "</style>\n</head>\n<body>\n<header>\n");
    sb_printf(o, "<p class=\"tool\">avow %s -- analysis report</p>\n<h1>", AVOW_VERSION);
    html_escape(o, p->title, strlen(p->title));
    sb_puts(o, "</h1>\n</header>\n<main>\n");
    doc d;
    doc_init(&d, o, 1);
    report_body(&d, ctx, p, r);
    sb_puts(o, "</main>\n</body>\n</html>\n");
}
