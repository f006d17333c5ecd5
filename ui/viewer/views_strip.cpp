// SPDX-License-Identifier: MIT
#include "ui/viewer/views_strip.h"

#include <QCheckBox>
#include <QDialogButtonBox>
#include <QEnterEvent>
#include <QGridLayout>
#include <QHBoxLayout>
#include <QLabel>
#include <QMouseEvent>
#include <QPainter>
#include <QScrollArea>
#include <QScrollBar>
#include <QToolButton>
#include <QVBoxLayout>

#include <algorithm>

#include "core/error.h"
#include "reconstruction/view_mode.h"
#include "ui/controller/case_controller.h"

namespace umbra::ui {

namespace {
constexpr int kLabelHeight = 18;
constexpr int kMinTileWidth = 240;
constexpr int kSpacing = 6;
constexpr double kMaxStripShare = 0.45;  ///< of the centre's height

}  // namespace

QString describeView(const std::string& mode) {
    try {
        const recon::ViewMode v = recon::parseViewMode(mode);
        return QStringLiteral("%1: %2").arg(QString::fromStdString(v.name), QString::fromStdString(recon::describeViewMode(v)));
    } catch (const core::SettingError&) {
        return QString::fromStdString(mode);
    }
}

// ------------------------------------------------------------------------------ tile

ViewTile::ViewTile(CaseController* controller, std::string mode, QWidget* parent)
    : QWidget(parent), ctl_(controller), mode_(std::move(mode)) {
    setObjectName(QStringLiteral("viewTile_%1").arg(QString::fromStdString(mode_)));
    setCursor(Qt::PointingHandCursor);
    setToolTip(tr("%1\nClick to show this view large.").arg(describeView(mode_)));
    setSizePolicy(QSizePolicy::Fixed, QSizePolicy::Fixed);  // the strip sizes its tiles (ViewsStrip::relayout)
}

QSize ViewTile::sizeHint() const { return size().isEmpty() ? QSize(kMinTileWidth, 120) : size(); }

void ViewTile::paintEvent(QPaintEvent*) {
    QPainter p(this);
    const QRectF r = QRectF(rect()).adjusted(1, 1, -1, -1);
    p.fillRect(rect(), QColor(21, 23, 28));
    p.setPen(QPen(hover_ ? QColor(120, 170, 255) : QColor(70, 76, 88), hover_ ? 2 : 1));
    p.drawRect(r);
    QFont f = font();
    f.setBold(true);
    p.setFont(f);
    p.setPen(QColor(220, 224, 232));
    p.drawText(QRectF(r.left() + 4, r.top(), r.width() - 8, kLabelHeight), Qt::AlignLeft | Qt::AlignVCenter,
               QString::fromStdString(mode_));
    const QRectF area = r.adjusted(3, kLabelHeight, -3, -3);
    const auto tile = ctl_->stripTile(mode_);
    p.setFont(font());
    if (!tile.image.isNull()) {
        p.setRenderHint(QPainter::SmoothPixmapTransform, true);
        const QSizeF s = QSizeF(tile.image.size()).scaled(area.size(), Qt::KeepAspectRatio);
        p.drawImage(QRectF(area.center() - QPointF(s.width() / 2, s.height() / 2), s), tile.image);
    } else {
        p.setPen(tile.problem.isEmpty() ? QColor(160, 166, 178) : QColor(255, 170, 120));
        p.drawText(area.adjusted(4, 4, -4, -4), Qt::AlignCenter | Qt::TextWordWrap,
                   tile.problem.isEmpty() ? tr("beamforming…") : tile.problem);
    }
}

void ViewTile::mouseReleaseEvent(QMouseEvent* e) {
    if (e->button() == Qt::LeftButton && rect().contains(e->position().toPoint())) emit clicked(QString::fromStdString(mode_));
}

void ViewTile::enterEvent(QEnterEvent*) {
    hover_ = true;
    update();
}

void ViewTile::leaveEvent(QEvent*) {
    hover_ = false;
    update();
}

// ------------------------------------------------------------------------------ strip

ViewsStrip::ViewsStrip(CaseController* controller, QWidget* parent) : QWidget(parent), ctl_(controller) {
    setObjectName(QStringLiteral("viewsStrip"));
    auto* outer = new QVBoxLayout(this);
    outer->setContentsMargins(6, 4, 6, 4);
    outer->setSpacing(3);
    auto* head = new QHBoxLayout;
    large_ = new QLabel;
    large_->setObjectName(QStringLiteral("largeViewLabel"));
    large_->setWordWrap(true);
    large_->setSizePolicy(QSizePolicy::Ignored, QSizePolicy::Preferred);  // wraps; never widens the window
    head->addWidget(large_, 1);
    choose_ = new QToolButton;
    choose_->setText(tr("Choose views…"));
    choose_->setToolTip(tr("Which views of the frame the strip shows (those this capture can be imaged in)"));
    head->addWidget(choose_);
    outer->addLayout(head);
    // Tiles in as many columns as fit at kMinTileWidth; more rows scroll: the strip never
    // widens the window, and takes at most kMaxStripShare of the centre's height.
    scroll_ = new QScrollArea;
    scroll_->setFrameShape(QFrame::NoFrame);
    scroll_->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    scroll_->setVerticalScrollBarPolicy(Qt::ScrollBarAsNeeded);
    scroll_->setWidgetResizable(true);
    auto* holder = new QWidget;
    grid_ = new QGridLayout(holder);
    grid_->setContentsMargins(0, 0, 0, 0);
    grid_->setSpacing(kSpacing);
    grid_->setAlignment(Qt::AlignLeft | Qt::AlignTop);
    scroll_->setWidget(holder);
    scroll_->viewport()->installEventFilter(this);
    outer->addWidget(scroll_, 1);
    connect(choose_, &QToolButton::clicked, this, &ViewsStrip::chooseViews);
    connect(ctl_, &CaseController::stripChanged, this, &ViewsStrip::rebuild);
    connect(ctl_, &CaseController::recipeChanged, this, &ViewsStrip::rebuild);
    connect(ctl_, &CaseController::captureChanged, this, &ViewsStrip::rebuild);
    connect(ctl_, &CaseController::imageChanged, this, &ViewsStrip::relayout);
    rebuild();
}

bool ViewsStrip::eventFilter(QObject* o, QEvent* e) {
    if (o == scroll_->viewport() && e->type() == QEvent::Resize) relayout();
    return QWidget::eventFilter(o, e);
}

void ViewsStrip::rebuild() {
    const auto modes = ctl_->stripViews();
    setVisible(ctl_->hasCapture() && !modes.empty());
    large_->setText(tr("Large view: <b>%1</b> — %2. Click a small view to show it large.")
                        .arg(QString::fromStdString(ctl_->largeView()), describeView(ctl_->largeView()).section(": ", 1)));
    if (modes != shown_) {
        for (auto* t : tiles_) {
            grid_->removeWidget(t);
            t->deleteLater();
        }
        tiles_.clear();
        for (const auto& m : modes) {
            auto* t = new ViewTile(ctl_, m, grid_->parentWidget());
            connect(t, &ViewTile::clicked, this, [this](const QString& mode) {
                try {
                    ctl_->showViewLarge(mode.toStdString());
                } catch (const core::SettingError& e) {
                    emit problem(tr("View %1").arg(mode), QString::fromUtf8(e.what()));
                }
            });
            tiles_.push_back(t);
        }
        shown_ = modes;
        relayout();
    }
    for (auto* t : tiles_) t->update();
}

void ViewsStrip::relayout() {
    if (tiles_.empty()) return;
    const int n = static_cast<int>(tiles_.size());
    const int avail = std::max(kMinTileWidth, scroll_->viewport()->width());
    const int cols = std::clamp((avail + kSpacing) / (kMinTileWidth + kSpacing), 1, n);
    const int tile_w = (avail - kSpacing * (cols - 1)) / cols;
    // Every view of a frame shares the large view's grid: the tiles take its aspect.
    const QImage& big = ctl_->image();
    const double aspect = (!big.isNull() && big.height() > 0) ? std::clamp(double(big.width()) / big.height(), 0.3, 6.0) : 1.5;
    const int tile_h = kLabelHeight + 6 + std::clamp(int((tile_w - 6) / aspect), 50, 260);
    for (int i = 0; i < n; ++i) {
        tiles_[size_t(i)]->setFixedSize(tile_w, tile_h);
        grid_->addWidget(tiles_[size_t(i)], i / cols, i % cols);
    }
    const int rows = (n + cols - 1) / cols;
    const int content = rows * tile_h + (rows - 1) * kSpacing;
    const int cap = parentWidget() ? int(parentWidget()->height() * kMaxStripShare) : content;
    scroll_->setFixedHeight(std::max(std::min(content, cap), std::min(content, tile_h)));
}

void ViewsStrip::chooseViews() {
    if (!ctl_->hasCapture()) return;
    ViewChooser dlg(ctl_->validViews(), ctl_->chosenViews(), ctl_->largeView(), this);
    if (dlg.exec() != QDialog::Accepted) return;
    try {
        ctl_->setChosenViews(dlg.chosen());
    } catch (const core::SettingError& e) {
        emit problem(tr("Views"), QString::fromUtf8(e.what()));
    }
}

// ------------------------------------------------------------------------------ chooser

ViewChooser::ViewChooser(const std::vector<std::string>& valid, const std::vector<std::string>& chosen, const std::string& large,
                         QWidget* parent)
    : QDialog(parent) {
    setWindowTitle(tr("Views in the strip"));
    auto* lay = new QVBoxLayout(this);
    auto* intro = new QLabel(tr("Views of the frame to show small beside the large one. Each is beamformed once per frame "
                                "and setting; its travel-time tables stay cached. Views this capture lacks the data for "
                                "(a shear speed, a plate thickness) are not listed."));
    intro->setWordWrap(true);
    lay->addWidget(intro);
    for (const auto& m : valid) {
        auto* box = new QCheckBox(describeView(m));
        box->setObjectName(QStringLiteral("view_%1").arg(QString::fromStdString(m)));
        box->setChecked(std::find(chosen.begin(), chosen.end(), m) != chosen.end() || m == large);
        if (m == large) box->setToolTip(tr("The large view now"));
        lay->addWidget(box);
        boxes_.emplace_back(m, box);
    }
    auto* bb = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel);
    connect(bb, &QDialogButtonBox::accepted, this, &QDialog::accept);
    connect(bb, &QDialogButtonBox::rejected, this, &QDialog::reject);
    lay->addWidget(bb);
}

std::vector<std::string> ViewChooser::chosen() const {
    std::vector<std::string> out;
    for (const auto& [m, box] : boxes_)
        if (box->isChecked()) out.push_back(m);
    return out;
}

}  // namespace umbra::ui
