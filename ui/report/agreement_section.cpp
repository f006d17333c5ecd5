// SPDX-License-Identifier: MIT
#include "ui/report/agreement_section.h"

#include "core/agreement.h"

namespace umbra::ui::report {

ReportSection agreementSection(const core::CaseDocument& first, const std::string& first_name,
                               const std::vector<core::CaseDocument>& others, const std::vector<std::string>& other_names) {
    std::vector<core::CaseDocument> cases{first};
    cases.insert(cases.end(), others.begin(), others.end());
    std::vector<std::string> names{first_name};
    names.insert(names.end(), other_names.begin(), other_names.end());
    const core::ReportSection plain = core::agreementReportSection(core::compareCases(cases, names));

    auto esc = [](const std::string& s) { return QString::fromStdString(s).toHtmlEscaped(); };
    QString html;
    for (const auto& p : plain.paragraphs) html += QStringLiteral("<p>%1</p>").arg(esc(p));
    for (const auto& t : plain.tables) {
        if (!t.caption.empty()) html += QStringLiteral("<p><b>%1</b></p>").arg(esc(t.caption));
        html += QStringLiteral("<table border=\"1\" cellspacing=\"0\" cellpadding=\"3\"><tr>");
        for (const auto& h : t.header) html += QStringLiteral("<th>%1</th>").arg(esc(h));
        html += QStringLiteral("</tr>");
        for (const auto& row : t.rows) {
            html += QStringLiteral("<tr>");
            for (const auto& c : row) html += QStringLiteral("<td>%1</td>").arg(esc(c));
            html += QStringLiteral("</tr>");
        }
        html += QStringLiteral("</table>");
    }
    ReportSection s;
    s.id = QStringLiteral("agreement");
    s.heading = plain.title.empty() ? QStringLiteral("Second reading and agreement") : QString::fromStdString(plain.title);
    s.html = html;
    return s;
}

}  // namespace umbra::ui::report
