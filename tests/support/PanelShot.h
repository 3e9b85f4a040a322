#pragma once

#include <QDir>
#include <QPixmap>
#include <QTest>
#include <QWidget>

// Renders a panel at a given size (a check that it paints) and, when
// CB_PANEL_SHOTS names a directory, saves it there as NAME.png for the docs.
inline bool renderPanel(QWidget &panel, const QSize &size, const QString &name)
{
    panel.resize(size);
    panel.show();
    if (!QTest::qWaitForWindowExposed(&panel))
        return false;
    const QPixmap shot = panel.grab();
    if (shot.isNull())
        return false;
    const QString dir = qEnvironmentVariable("CB_PANEL_SHOTS");
    return dir.isEmpty() || shot.save(QDir(dir).filePath(name + QStringLiteral(".png")), "PNG");
}
