using MeasureEval.Engine.Tests.Support;

namespace MeasureEval.Engine.Tests.Terminology;

public sealed class ValueSetIndexTests
{
    private static ValueSetIndex ValueSet(string id) =>
        RepositoryPaths.Repository.TryGetValueSet(id, out var valueSet) ? valueSet : throw new InvalidOperationException(id);

    [Theory]
    [InlineData("E11", true)] // ICD-10-CM E11.* covers E11 itself (spec: "E11.* covers E11, E11.9, E11.65")
    [InlineData("E11.9", true)]
    [InlineData("E11.65", true)]
    [InlineData("E111", false)] // undotted: not a code below E11 in the tabular list's form
    [InlineData("E12.9", false)]
    [InlineData("O24.410", false)] // spec: no O24.* code qualifies for diabetes
    public void Contains_DiabetesIsA_CodeAndEveryCodeBelow(string code, bool member) =>
        Assert.Equal(member, ValueSet("diabetes").Contains(CodeSystems.Icd10Cm, code));

    [Theory]
    [InlineData("C18", true)]
    [InlineData("C18.0", true)]
    [InlineData("C19", true)]
    [InlineData("C19.1", false)] // C19 matches exactly
    [InlineData("C20", true)]
    [InlineData("Z90.49", false)] // spec: never counts for colorectal cancer
    public void Contains_ColorectalCancer_FollowsTheSpec(string code, bool member) =>
        Assert.Equal(member, ValueSet("colorectal-cancer").Contains(CodeSystems.Icd10Cm, code));

    [Theory]
    [InlineData("03", true)] // CVX compares as a string with its leading zero (CDC CVX table: 03 = MMR)
    [InlineData("3", false)]
    [InlineData("94", true)]
    public void Contains_Cvx_StringWithLeadingZeros(string code, bool member) =>
        Assert.Equal(member, ValueSet("mmr-vaccine").Contains(CodeSystems.Cvx, code));

    [Fact]
    public void Contains_SnomedCode_IsExactNoDescendants() =>
        Assert.False(ValueSet("colorectal-cancer").Contains(CodeSystems.Snomed, "363406005.1"));

    [Fact]
    public void Contains_SameCodeOtherSystem_IsNotAMember() =>
        Assert.False(ValueSet("colorectal-cancer").Contains(CodeSystems.Snomed, "C18.0"));
}
