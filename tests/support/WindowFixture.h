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

    // The recovery file's delay is long by default, so that tests write it when they say so.
    explicit WindowFixture(int recoveryDelayMs = 30'000) { open(recoveryDelayMs); }

    cb::WindowOptions options(int recoveryDelayMs)
    {
        cb::WindowOptions o;
        o.prompter = &prompter;
        o.settingsFile = dir.filePath(QStringLiteral("settings.ini"));
        o.recoveryDirectory = dir.filePath(QStringLiteral("recovery"));
        o.recoveryDelayMs = recoveryDelayMs;
        return o;
    }
    // Starts a new window on the same directory (as after a crash and restart).
    void open(int recoveryDelayMs = 30'000)
    {
        window = std::make_unique<cb::MainWindow>(options(recoveryDelayMs));
        window->resize(1200, 800);
    }
    bool show()
    {
        window->show();
        return QTest::qWaitForWindowExposed(window.get());
    }
};
