// SPDX-License-Identifier: MIT
#pragma once
// Undo commands. Every edit is "replace a value with another": one generic template holds the
// before/after values and a setter; one small class per kind of edit names it for the Edit
// menu (and lets the undo stack tell kinds apart).
#include <QElapsedTimer>
#include <QUndoCommand>

#include <functional>
#include <string>
#include <utility>
#include <vector>

#include "core/finding.h"
#include "core/measurement.h"
#include "core/parameters.h"

namespace umbra::ui {

/// Generic "change a value" command: redo() applies `after`, undo() applies `before`.
///
///   stack->push(new ValueCommand<int>("Set answer", 41, 42, [&](const int& v) { x = v; }));
template <typename T>
class ValueCommand : public QUndoCommand {
public:
    using Setter = std::function<void(const T&)>;
    ValueCommand(const QString& text, T before, T after, Setter setter)
        : before_(std::move(before)), after_(std::move(after)), setter_(std::move(setter)) {
        setText(text);
    }
    void redo() override { setter_(after_); }
    void undo() override { setter_(before_); }
    const T& before() const { return before_; }
    const T& after() const { return after_; }

protected:
    T before_, after_;
    Setter setter_;
};

using MeasurementList = std::vector<core::Measurement>;
using FindingList = std::vector<core::Finding>;

/// A recipe value (or a whole loaded recipe) changed. Edits of the same value less than 1.5 s
/// apart (spin-box steps) merge into one undo entry; a whole-recipe edit (empty key) never merges.
class RecipeEditCommand : public ValueCommand<core::Recipe> {
public:
    RecipeEditCommand(const QString& text, core::Recipe before, core::Recipe after, Setter setter,
                      std::string key = {})
        : ValueCommand(text, std::move(before), std::move(after), std::move(setter)), key_(std::move(key)) {
        timer_.start();
    }
    int id() const override { return 0x52435045; }
    bool mergeWith(const QUndoCommand* other) override {
        if (other->id() != id()) return false;
        const auto* o = static_cast<const RecipeEditCommand*>(other);
        if (key_.empty() || o->key_ != key_ || timer_.elapsed() > 1500) return false;
        after_ = o->after();
        setText(o->text());
        timer_.start();
        return true;
    }

private:
    std::string key_;
    QElapsedTimer timer_;
};
/// A measurement was added.
class AddMeasurementCommand : public ValueCommand<MeasurementList> {
public:
    using ValueCommand::ValueCommand;
};
/// A measurement's points were dragged.
class MoveMeasurementCommand : public ValueCommand<MeasurementList> {
public:
    using ValueCommand::ValueCommand;
};
/// A measurement was deleted.
class DeleteMeasurementCommand : public ValueCommand<MeasurementList> {
public:
    using ValueCommand::ValueCommand;
};
/// A measurement's label changed.
class RelabelMeasurementCommand : public ValueCommand<MeasurementList> {
public:
    using ValueCommand::ValueCommand;
};
/// A finding was added, edited or removed. Consecutive edits with the same name (typing in
/// one field) merge into one undo entry.
class FindingEditCommand : public ValueCommand<FindingList> {
public:
    using ValueCommand::ValueCommand;
    int id() const override { return 0x46494e44; }
    bool mergeWith(const QUndoCommand* other) override {
        if (other->id() != id() || other->text() != text() || text().startsWith("Add") || text().startsWith("Remove"))
            return false;
        after_ = static_cast<const FindingEditCommand*>(other)->after();
        return true;
    }
};

}  // namespace umbra::ui
