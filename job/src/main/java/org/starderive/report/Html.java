package org.starderive.report;

/**
 * Turns the reports' own Markdown (headings, paragraphs, pipe tables, images, inline code, bold) into one
 * self-contained HTML page. Only the subset the reports write is handled.
 */
final class Html {
    private Html() {}

    private static String esc(String s) {
        return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;");
    }

    private static String inline(String s) {
        String e = esc(s);
        e = e.replaceAll("!\\[([^\\]]*)\\]\\(([^)]+)\\)", "<img alt=\"$1\" src=\"$2\">");
        e = e.replaceAll("`([^`]+)`", "<code>$1</code>");
        e = e.replaceAll("\\*\\*([^*]+)\\*\\*", "<b>$1</b>");
        return e;
    }

    static String fromReportMarkdown(String md, String title) {
        StringBuilder h = new StringBuilder();
        h.append("<!DOCTYPE html>\n<html><head><meta charset=\"utf-8\"><title>").append(esc(title)).append("</title>\n")
         .append("<style>body{font-family:sans-serif;max-width:1000px;margin:2em auto;color:#222}")
         .append("table{border-collapse:collapse}td,th{border:1px solid #ccc;padding:2px 8px;text-align:right}")
         .append("td:first-child,th:first-child{text-align:left}img{max-width:100%}</style></head><body>\n");
        boolean inTable = false;
        boolean header = false;
        for (String line : md.split("\n")) {
            if (line.startsWith("|")) {
                String[] cells = line.substring(1, line.length() - (line.endsWith("|") ? 1 : 0)).split("\\|");
                if (line.matches("\\|[-| ]+\\|?")) {
                    continue;
                }
                if (!inTable) {
                    h.append("<table>\n");
                    inTable = true;
                    header = true;
                }
                h.append("<tr>");
                for (String c : cells) {
                    h.append(header ? "<th>" : "<td>").append(inline(c.trim())).append(header ? "</th>" : "</td>");
                }
                h.append("</tr>\n");
                header = false;
                continue;
            }
            if (inTable) {
                h.append("</table>\n");
                inTable = false;
            }
            if (line.startsWith("## ")) {
                h.append("<h2>").append(inline(line.substring(3))).append("</h2>\n");
            } else if (line.startsWith("# ")) {
                h.append("<h1>").append(inline(line.substring(2))).append("</h1>\n");
            } else if (!line.isBlank()) {
                h.append("<p>").append(inline(line)).append("</p>\n");
            }
        }
        if (inTable) {
            h.append("</table>\n");
        }
        return h.append("</body></html>\n").toString();
    }
}
