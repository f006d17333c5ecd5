// SPDX-License-Identifier: MIT
// Agreement statistics against outside references: scikit-learn's cohen_kappa_score and
// statsmodels' cohens_kappa / fleiss_kappa (Debian's python3-sklearn, python3-statsmodels via
// /usr/bin/python3), published worked examples, and the Bland–Altman PEFR data.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <unistd.h>

#include "core/agreement.h"
#include "core/error.h"

using namespace umbra::core;
namespace fs = std::filesystem;

namespace {

/// Runs a Python script with Debian's interpreter in a directory unique to this test; returns stdout.
std::string python(const std::string& script) {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    const fs::path dir = fs::temp_directory_path() /
                         ("umbra_agreement_" + std::to_string(::getpid()) + "_" + info->name());
    fs::create_directories(dir);
    const fs::path file = dir / "check.py";
    std::ofstream(file) << script;
    std::string out;
    const std::string cmd = "/usr/bin/python3 '" + file.string() + "'";
    if (FILE* p = ::popen(cmd.c_str(), "r")) {
        char buf[512];
        while (std::fgets(buf, sizeof buf, p)) out += buf;
        if (::pclose(p) != 0) out = "failed: " + out;
    }
    fs::remove_all(dir);
    return out;
}

std::vector<double> numbers(const std::string& s) {
    std::istringstream in(s);
    std::vector<double> v;
    double x;
    while (in >> x) v.push_back(x);
    return v;
}

std::string pyList(const std::vector<std::string>& v) {
    std::string s = "[";
    for (const auto& x : v) s += "'" + x + "',";
    return s + "]";
}

ConfusionMatrix matrix(std::vector<std::vector<double>> c) {
    ConfusionMatrix m;
    for (size_t i = 0; i < c.size(); ++i) {
        std::string label = "c";
        label += std::to_string(i);
        m.labels.push_back(label);
    }
    m.counts = std::move(c);
    return m;
}

}  // namespace

// Fleiss, Levin & Paik, Statistical Methods for Rates and Proportions, 3rd ed. (2003), ch. 18:
// two psychiatrists, 100 subjects, diagnoses psychotic / neurotic / organic (table from memory):
// p_o = 0.89, p_e = 0.66, kappa = 0.68. Standard error of Fleiss, Cohen & Everitt (1969)
// compared with statsmodels' cohens_kappa (std_kappa, kappa_low, kappa_upp).
TEST(Agreement, CohenKappaWorkedExampleFleissLevinPaik) {
    const ConfusionMatrix m = matrix({{75, 1, 4}, {5, 4, 1}, {0, 0, 10}});
    const CohenKappaResult k = cohenKappa(m);
    EXPECT_NEAR(k.observed, 0.89, 1e-12);  // worked example (from memory)
    EXPECT_NEAR(k.expected, 0.66, 1e-12);  // worked example (from memory)
    EXPECT_NEAR(k.kappa, 0.68, 0.005);     // worked example (from memory), to its two decimals
    const auto ref = numbers(python(
        "import numpy as np\nfrom statsmodels.stats.inter_rater import cohens_kappa\n"
        "r = cohens_kappa(np.array([[75,1,4],[5,4,1],[0,0,10]]))\n"
        "print(r.kappa, r.std_kappa, r.kappa_low, r.kappa_upp)\n"));
    ASSERT_EQ(ref.size(), 4u) << "needs /usr/bin/python3 with statsmodels (python3-statsmodels)";
    EXPECT_NEAR(k.kappa, ref[0], 1e-12);
    EXPECT_NEAR(k.se, ref[1], 1e-12);
    EXPECT_NEAR(k.ci_low, ref[2], 1e-9);
    EXPECT_NEAR(k.ci_high, ref[3], 1e-9);
}

// Random paired ratings (four categories, skewed margins, partly agreeing): kappa as
// scikit-learn's cohen_kappa_score, standard error and interval as statsmodels.
TEST(Agreement, CohenKappaMatchesScikitLearnAndStatsmodels) {
    std::mt19937 rng(7);
    const std::vector<std::string> labels = interpretationLabels();
    std::vector<CohenKappaResult> ours;
    std::string script =
        "import numpy as np\nfrom sklearn.metrics import cohen_kappa_score, confusion_matrix\n"
        "from statsmodels.stats.inter_rater import cohens_kappa\nL = " + pyList(labels) + "\n"
        "def check(a, b):\n    t = confusion_matrix(a, b, labels=L)\n    r = cohens_kappa(t)\n"
        "    print(cohen_kappa_score(a, b, labels=L), r.std_kappa, r.kappa_low, r.kappa_upp)\n";
    for (int trial = 0; trial < 4; ++trial) {
        std::vector<std::string> a, b;
        std::discrete_distribution<int> pick({1, 2, 3, 6});
        std::bernoulli_distribution agree(0.4 + 0.15 * trial);
        for (int i = 0; i < 30 + 20 * trial; ++i) {
            const int x = pick(rng);
            a.push_back(labels[static_cast<size_t>(x)]);
            b.push_back(agree(rng) ? labels[static_cast<size_t>(x)] : labels[static_cast<size_t>(pick(rng))]);
        }
        ours.push_back(cohenKappa(confusionMatrix(a, b, labels)));
        script += "check(" + pyList(a) + ", " + pyList(b) + ")\n";
    }
    const auto ref = numbers(python(script));
    ASSERT_EQ(ref.size(), 16u) << "needs /usr/bin/python3 with sklearn and statsmodels";
    for (size_t t = 0; t < 4; ++t) {
        EXPECT_NEAR(ours[t].kappa, ref[4 * t], 1e-12) << "trial " << t;
        EXPECT_NEAR(ours[t].se, ref[4 * t + 1], 1e-12) << "trial " << t;
        EXPECT_NEAR(ours[t].ci_low, ref[4 * t + 2], 1e-9) << "trial " << t;
        EXPECT_NEAR(ours[t].ci_high, ref[4 * t + 3], 1e-9) << "trial " << t;
    }
}

// Perfect agreement gives kappa 1 with zero standard error (Cohen 1960: kappa = 1 when p_o = 1);
// every rating in one category leaves kappa undefined (p_e = 1).
TEST(Agreement, CohenKappaEdgeCases) {
    const CohenKappaResult perfect = cohenKappa(matrix({{5, 0}, {0, 7}}));
    EXPECT_DOUBLE_EQ(perfect.kappa, 1.0);
    EXPECT_NEAR(perfect.se, 0.0, 1e-12);
    EXPECT_TRUE(std::isnan(cohenKappa(matrix({{9, 0}, {0, 0}})).kappa));
    EXPECT_THROW(cohenKappa(matrix({{1, 2, 3}, {1, 2}, {1, 1, 1}})), SettingError);
    EXPECT_EQ(formatKappa(perfect).rfind("Cohen's κ 1", 0), 0u) << formatKappa(perfect);
}

// Fleiss' kappa: the worked example of the Wikipedia article "Fleiss' kappa" (10 subjects,
// 14 raters, 5 categories; P̄ = 0.378, P̄e = 0.213, kappa = 0.210; table from memory) and
// statsmodels' fleiss_kappa.
TEST(Agreement, FleissKappaWorkedExample) {
    const std::vector<std::vector<double>> t = {{0, 0, 0, 0, 14}, {0, 2, 6, 4, 2}, {0, 0, 3, 5, 6}, {0, 3, 9, 2, 0},
                                                {2, 2, 8, 1, 1},  {7, 7, 0, 0, 0}, {3, 2, 6, 3, 0}, {2, 5, 3, 2, 2},
                                                {6, 5, 2, 1, 0},  {0, 2, 2, 3, 7}};
    const FleissKappaResult k = fleissKappa(t);
    EXPECT_EQ(k.raters, 14u);
    EXPECT_NEAR(k.observed, 0.378, 0.0005);  // from memory
    EXPECT_NEAR(k.expected, 0.213, 0.0005);  // from memory
    EXPECT_NEAR(k.kappa, 0.210, 0.0005);     // from memory
    EXPECT_NEAR(k.category_share[0], 0.143, 0.0005);  // p_1 (from memory)
    const auto ref = numbers(python(
        "import numpy as np\nfrom statsmodels.stats.inter_rater import fleiss_kappa\n"
        "print(fleiss_kappa(np.array([[0,0,0,0,14],[0,2,6,4,2],[0,0,3,5,6],[0,3,9,2,0],[2,2,8,1,1],"
        "[7,7,0,0,0],[3,2,6,3,0],[2,5,3,2,2],[6,5,2,1,0],[0,2,2,3,7]])))\n"));
    ASSERT_EQ(ref.size(), 1u) << "needs /usr/bin/python3 with statsmodels";
    EXPECT_NEAR(k.kappa, ref[0], 1e-12);
    EXPECT_THROW(fleissKappa({{1, 1}, {2, 1}}), SettingError);  // unequal numbers of ratings
}

// With two raters Fleiss' kappa equals Scott's pi (Fleiss 1971), computed here from its
// definition with pooled margins by numpy.
TEST(Agreement, FleissKappaTwoRatersIsScottsPi) {
    const std::vector<std::vector<double>> t = {{2, 0, 0}, {1, 1, 0}, {0, 2, 0}, {0, 1, 1}, {0, 0, 2}, {2, 0, 0}, {1, 0, 1}};
    const auto ref = numbers(python(
        "import numpy as np\n"
        "a = ['x','x','y','y','z','x','x']\nb = ['x','y','y','z','z','x','z']\n"
        "po = np.mean([u == v for u, v in zip(a, b)])\n"
        "p = np.array([(a + b).count(c) for c in 'xyz']) / 14.0\npe = (p ** 2).sum()\n"
        "print((po - pe) / (1 - pe))\n"));
    ASSERT_EQ(ref.size(), 1u);
    EXPECT_NEAR(fleissKappa(t).kappa, ref[0], 1e-12);
}

// Bland & Altman (Lancet 1986), Table 1: PEFR (l/min) of 17 subjects, first reading with the
// Wright peak flow meter and with the mini Wright meter (data from memory). The paper gives
// mean difference −2.1 l/min, SD 38.8 l/min and limits −79.7 to 75.5 l/min (bias ± 2 SD;
// from memory). numpy checks the same numbers.
TEST(Agreement, BlandAltmanPefrExample) {
    const std::vector<double> wright = {494, 395, 516, 434, 476, 557, 413, 442, 650, 433, 417, 656, 267, 478, 178, 423, 427};
    const std::vector<double> mini = {512, 430, 520, 428, 500, 600, 364, 380, 658, 445, 432, 626, 260, 477, 259, 350, 451};
    const BlandAltmanResult r = blandAltman(wright, mini, 2.0);
    EXPECT_NEAR(r.bias, -2.1, 0.05);     // paper, from memory
    EXPECT_NEAR(r.sd, 38.8, 0.05);       // paper, from memory
    EXPECT_NEAR(r.loa_low, -79.7, 0.1);  // paper, from memory
    EXPECT_NEAR(r.loa_high, 75.5, 0.1);  // paper, from memory
    const auto ref = numbers(python(
        "import numpy as np\nw = np.array([494,395,516,434,476,557,413,442,650,433,417,656,267,478,178,423,427.])\n"
        "m = np.array([512,430,520,428,500,600,364,380,658,445,432,626,260,477,259,350,451.])\n"
        "d = w - m\nprint(d.mean(), d.std(ddof=1), d.mean() - 1.959963984540054 * d.std(ddof=1))\n"));
    ASSERT_EQ(ref.size(), 3u);
    EXPECT_NEAR(r.bias, ref[0], 1e-9);
    EXPECT_NEAR(r.sd, ref[1], 1e-9);
    EXPECT_NEAR(blandAltman(wright, mini).loa_low, ref[2], 1e-9);
    EXPECT_THROW(blandAltman({1, 2}, {1}), SettingError);
}

namespace {

CaseDocument readerCase(const std::vector<std::tuple<double, double, Interpretation, Evaluation, double>>& f) {
    CaseDocument c;
    c.captures.push_back({"/data/a.h5", std::string(64, 'a'), "", {}, {}, {}, {}});
    c.captures.push_back({"/data/b.h5", std::string(64, 'b'), "", {}, {}, {}, {}});
    int n = 1;
    for (const auto& [x, z, in, ev, len] : f) {
        Finding fi;
        fi.id = "F" + std::to_string(n);
        fi.number = n++;
        fi.indication.capture_index = 0;
        fi.indication.frame_index = 3;
        fi.indication.x_mm = x;
        fi.indication.depth_mm = z;
        fi.indication.length_mm = len;
        fi.interpretation = in;
        fi.evaluation = ev;
        c.findings.push_back(fi);
    }
    return c;
}

}  // namespace

// Matching by the stated rule: same capture and frame, centres within 3 mm; closest pairs first.
TEST(Agreement, CasesMatchWithinThreeMillimetres) {
    using I = Interpretation;
    using E = Evaluation;
    const CaseDocument r1 = readerCase({{0, 10, I::Relevant, E::Rejectable, 5.0},
                                        {10, 12, I::NonRelevant, E::Unset, 2.0},
                                        {-10, 5, I::Relevant, E::Acceptable, 3.0}});
    const CaseDocument r2 = readerCase({{1, 11, I::Relevant, E::ReferForReview, 5.4},   // 1.4 mm from F1
                                        {12.5, 13, I::Relevant, E::Acceptable, 2.6},    // 2.7 mm from F2
                                        {-10, 9, I::Relevant, E::Acceptable, 3.0}});    // 4 mm: no match
    const AgreementResult a = compareCases({r1, r2}, {"one.umbracase", "two.umbracase"});
    EXPECT_EQ(a.matched, 2u);
    EXPECT_EQ(a.unmatched, 2u);
    ASSERT_TRUE(a.interpretation.cohen);
    // Matched pairs: (relevant, relevant), (non-relevant, relevant).
    const size_t rel = 3, nonrel = 2;
    EXPECT_EQ(a.interpretation.confusion.counts[rel][rel], 1);
    EXPECT_EQ(a.interpretation.confusion.counts[nonrel][rel], 1);
    ASSERT_EQ(a.sizes.size(), 1u);  // lengths only (no heights given)
    EXPECT_NEAR(a.sizes[0].ba.bias, 0.5, 1e-12);  // (0.4 + 0.6) / 2
    // A third reader: Fleiss' kappa instead of Cohen's.
    const CaseDocument r3 = readerCase({{0.5, 10.5, I::Relevant, E::Rejectable, 5.0}});
    const AgreementResult b = compareCases({r1, r2, r3}, {"1", "2", "3"});
    EXPECT_EQ(b.matched, 1u);
    EXPECT_TRUE(b.interpretation.fleiss);
    EXPECT_FALSE(b.interpretation.cohen);
}

TEST(Agreement, CasesOnOtherCapturesAreRefused) {
    CaseDocument a = readerCase({});
    CaseDocument b = readerCase({});
    b.captures[1].sha256 = std::string(64, 'c');
    try {
        compareCases({a, b}, {"a.umbracase", "b.umbracase"});
        FAIL() << "expected InputError";
    } catch (const InputError& e) {
        EXPECT_EQ(e.file(), "b.umbracase");
        EXPECT_NE(std::string(e.what()).find("SHA-256"), std::string::npos);
    }
    EXPECT_THROW(compareCases({a}, {"a"}), SettingError);
}

// The report section holds the confusion tables as plain data, totals included.
TEST(Agreement, ReportSectionTables) {
    using I = Interpretation;
    using E = Evaluation;
    const CaseDocument r1 = readerCase({{0, 10, I::Relevant, E::Rejectable, 5.0}, {8, 10, I::False, E::Unset, 1.0}});
    const CaseDocument r2 = readerCase({{0, 10, I::Relevant, E::Rejectable, 5.0}, {8, 10, I::NonRelevant, E::Unset, 1.0}});
    const ReportSection s = agreementReportSection(compareCases({r1, r2}, {"a", "b"}));
    ASSERT_GE(s.tables.size(), 2u);
    EXPECT_EQ(s.tables[0].rows.back().back(), "2");  // grand total of the interpretation table
    EXPECT_EQ(s.tables[0].header.size(), 6u);        // corner, four classes, total
}
