using ModeSolver.Output;

namespace ModeSolver.Tests.Output;

public class PlotTitleTests
{
    [Fact]
    public void ShortTitlesStayOnOneLineAndLongOnesWrapBeforeTheDetail()
    {
        Assert.Equal("t-model: Hubble-flow parameters", PlotScales.Title("t-model", "Hubble-flow parameters"));
        string subject = new string('x', 70);
        string wrapped = PlotScales.Title(subject, "primordial spectra (n_s = 0.9609, r = 4.388e-3)");
        Assert.Equal(subject + "\nprimordial spectra (n_s = 0.9609, r = 4.388e-3)", wrapped);
        Assert.True(PlotScales.TitlePadding(wrapped) > PlotScales.TitlePadding("one line"));
    }
}
