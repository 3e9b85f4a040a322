#pragma once

#include "ui/window/MainWindow.h"
#include "tests/support/ScriptedPrompter.h"

#include <QTemporaryDir>
#include <QTest>

#include <memory>

// A window with throwaway settings and recovery directory and pre-answered questions.
struct WindowFixture
{
    QTemporaryDir dir;
    ScriptedPrompter prompter;
    std::unique_ptr<cb::MainWindow> window;

    explicit WindowFixture(int autosaveMs = 30'000) { open(autosaveMs); }

    cb::WindowOptions options(int autosaveMs)
    {
        cb::WindowOptions o;
        o.prompter = &prompter;
        o.settingsFile = dir.filePath(QStringLiteral("settings.ini"));
        o.recoveryDirectory = dir.filePath(QStringLiteral("recovery"));
        o.autosaveIntervalMs = autosaveMs;
        return o;
    }
    // Starts a new window on the same directory (as after a crash and restart).
    void open(int autosaveMs = 30'000)
    {
        window = std::make_unique<cb::MainWindow>(options(autosaveMs));
        window->resize(1200, 800);
    }
    bool show()
    {
        window->show();
        return QTest::qWaitForWindowExposed(window.get());
    }
};
