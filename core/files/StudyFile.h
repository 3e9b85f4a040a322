#pragma once

#include "core/base/Result.h"
#include "core/model/Design.h"
#include "core/model/Study.h"

#include <QByteArray>
#include <QString>

namespace cb {

// Design files: version 2 of the scheme format holds designs ("design" object); version 1 files
// still load (as one-factor schemes, through schemeFromJson).
QByteArray designToJson(const Design &design);
Result<Design> designFromJson(const QByteArray &data, const QString &where);
bool isDesignJson(const QByteArray &data);

// Study files: a design file for two or more factors, a scheme file otherwise; with the power
// planner's inputs under "power" when they are not all at their defaults (DEVELOPERS.md,
// "Study files").
QByteArray studyToJson(const Study &study);
// The one reader of study files, for the window, its recovery file and the command line alike:
// a scheme file or a design file, every factor with a standard scheme coded as its definition
// says (the columns written for it are not read; DEVELOPERS.md, "Columns that contradict their
// scheme"), the power plan's levels checked against the study's levels or cells, and settled()
// (core/analysis/Settled.h). `where` names the source in messages.
Result<Study> studyFromJson(const QByteArray &data, const QString &where);
Result<Study> loadStudy(const QString &path);
QString saveStudy(const Study &study, const QString &path); // error message or empty

} // namespace cb
