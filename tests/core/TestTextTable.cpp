// The one plain-text table builder of the command-line reports.
#include "core/report/TextTable.h"

#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestTextTable : public QObject
{
    Q_OBJECT
private slots:
    void alignsTextLeftAndNumbersRight();
    void notesSitUnderTheirRowWithoutWideningIt();
    void columnsCanBeLeftAligned();
};

void TestTextTable::alignsTextLeftAndNumbersRight()
{
    TextTable t({u"level"_s, u"n"_s, u"mean"_s});
    t.addRow({u"none"_s, u"12"_s, u"4.5"_s});
    t.addRow({u"daily"_s, u"8"_s, u"10.25"_s});
    QCOMPARE(t.text(), u"  level   n   mean\n"
                       u"  none   12    4.5\n"
                       u"  daily   8  10.25\n"_s);
}

void TestTextTable::notesSitUnderTheirRowWithoutWideningIt()
{
    TextTable t({u"coefficient"_s, u"estimate"_s}, 0);
    t.addRow({u"b1 low"_s, u"2"_s});
    t.addNote(u"tests a long description of what b1 compares"_s);
    t.addRow({u"b2 high"_s, u"-3"_s});
    QCOMPARE(t.text(), u"coefficient  estimate\n"
                       u"b1 low              2\n"
                       u"             tests a long description of what b1 compares\n"
                       u"b2 high            -3\n"_s);
}

void TestTextTable::columnsCanBeLeftAligned()
{
    TextTable t({u"contrast"_s, u"power"_s, u"n for target"_s});
    t.setAlign(2, TextTable::Align::Left);
    t.addRow({u"low vs control"_s, u"0.37"_s, u"77 per level"_s});
    t.addRow({u"high"_s, u"0.7328"_s, u"\u2014"_s});
    QCOMPARE(t.text(), u"  contrast         power  n for target\n"
                       u"  low vs control    0.37  77 per level\n"
                       u"  high            0.7328  \u2014\n"_s);
}

QTEST_GUILESS_MAIN(TestTextTable)
#include "TestTextTable.moc"
