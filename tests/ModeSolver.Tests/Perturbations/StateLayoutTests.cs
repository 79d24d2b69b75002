using ModeSolver.Perturbations;

namespace ModeSolver.Tests.Perturbations;

public class StateLayoutTests
{
    [Fact]
    public void BlocksLieEndToEndInTheOrderAdded()
    {
        var layout = new StateLayout();
        Assert.Equal(0, layout.Add("zeta", 12));
        Assert.Equal(1, layout.Add("tensor", 4));
        Assert.Equal(16, layout.Dimension);
        Assert.Equal(new StateBlock("zeta", 0, 12), layout[0]);
        Assert.Equal(new StateBlock("tensor", 12, 4), layout[1]);
        Assert.Equal(1, layout.IndexOf("tensor"));
        Assert.Equal(-1, layout.IndexOf("isocurvature"));
        var state = new double[layout.Dimension];
        layout[1].Of(state.AsSpan()).Fill(7);
        Assert.Equal(0, state[11]);
        Assert.Equal(7, state[12]);
        Assert.Equal(7, state[15]);
        layout.Clear();
        Assert.Equal(0, layout.Dimension);
        Assert.Throws<ArgumentOutOfRangeException>(() => layout[0]);
    }

    [Fact]
    public void RefusesEmptyBlocksAndTooManyBlocks()
    {
        var layout = new StateLayout();
        Assert.Throws<ArgumentOutOfRangeException>(() => layout.Add("empty", 0));
        for (int i = 0; i < StateLayout.MaxBlocks; i++) layout.Add("b" + i, 2);
        Assert.Throws<InvalidOperationException>(() => layout.Add("one more", 2));
    }
}
