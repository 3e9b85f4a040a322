#pragma once
// One way for tests to run a program (the built command line, g++, the Python reference
// scripts): arguments, optional standard input, exit code and both outputs.

#include <QByteArray>
#include <QProcess>
#include <QString>
#include <QStringList>

namespace cb::test {

struct ProcessRun
{
    bool started = false;
    int exitCode = -1; // -1 when the program crashed or did not finish
    QByteArray out;
    QByteArray err;
    QString outText() const { return QString::fromUtf8(out); }
    QString errText() const { return QString::fromUtf8(err); }
};

// env: the program's whole environment when not empty (otherwise the test's own).
inline ProcessRun runProcess(const QString &program, const QStringList &args, const QByteArray &input = {},
                             int timeoutMs = 240000, const QString &workDir = {},
                             const QProcessEnvironment &env = QProcessEnvironment())
{
    QProcess p;
    if (!workDir.isEmpty())
        p.setWorkingDirectory(workDir);
    if (!env.isEmpty())
        p.setProcessEnvironment(env);
    p.start(program, args);
    ProcessRun r;
    r.started = p.waitForStarted(30000);
    if (!r.started)
        return r;
    if (!input.isEmpty())
        p.write(input);
    p.closeWriteChannel();
    p.waitForFinished(timeoutMs);
    r.exitCode = p.exitStatus() == QProcess::NormalExit ? p.exitCode() : -1;
    r.out = p.readAllStandardOutput();
    r.err = p.readAllStandardError();
    return r;
}

inline QString cliProgram()
{
    return QStringLiteral(CB_BINARY_DIR "/app/contrast-bench-cli");
}

inline ProcessRun runCli(const QStringList &args, const QByteArray &input = {})
{
    return runProcess(cliProgram(), args, input);
}

} // namespace cb::test
