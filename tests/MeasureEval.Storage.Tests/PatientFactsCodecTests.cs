using System.Collections;
using System.Globalization;
using System.Reflection;
using System.Text.Json;
using System.Text.Json.Serialization.Metadata;
using MeasureEval.Core.Index;
using MeasureEval.Storage.Common;

namespace MeasureEval.Storage.Tests;

public sealed class PatientFactsCodecTests
{
    private static readonly JsonSerializerOptions Reflective = new() { TypeInfoResolver = new DefaultJsonTypeInfoResolver() };

    [Fact]
    public void Decode_EntryOfTestResources_GivesEqualContent()
    {
        var entry = PatientFactsAssembler.Assemble([TestResources.Ana(), TestResources.HbA1c(), TestResources.AnaCoverage(), TestResources.Flu()]).Single();

        var decoded = PatientFactsCodec.Decode(PatientFactsCodec.Encode(entry));

        Assert.Equal(JsonSerializer.Serialize(entry, Reflective), JsonSerializer.Serialize(decoded, Reflective));
    }

    /// <summary>Fills every property of the index model by reflection, so a property added to the model and not to the codec fails here.</summary>
    [Fact]
    public void Decode_EveryModelPropertySet_GivesEqualContent()
    {
        var filler = new Filler();
        var entry = (PatientFacts)filler.Make(typeof(PatientFacts));

        var decoded = PatientFactsCodec.Decode(PatientFactsCodec.Encode(entry));

        Assert.Equal(JsonSerializer.Serialize(entry, Reflective), JsonSerializer.Serialize(decoded, Reflective));
    }

    [Fact]
    public void Decode_EmptyEntry_KeepsNullsAndEmptyLists()
    {
        var entry = new PatientFacts { PatientId = "pat-only-id" };

        var decoded = PatientFactsCodec.Decode(PatientFactsCodec.Encode(entry));

        Assert.Equal(JsonSerializer.Serialize(entry, Reflective), JsonSerializer.Serialize(decoded, Reflective));
    }

    [Fact]
    public void Decode_DecimalScale_IsKept()
    {
        // 7.20 and 7.2 are different decimals in .NET (scale 2 vs 1); a quantity keeps what was stated.
        var entry = new PatientFacts
        {
            PatientId = "p",
            Facts = [new ClinicalFact { ResourceType = "Observation", Id = "o", Quantity = new FactQuantity(-7.20m, null, null, null, null) }],
        };

        var value = PatientFactsCodec.Decode(PatientFactsCodec.Encode(entry)).Facts[0].Quantity!.Value!.Value;

        Assert.Equal("-7.20", value.ToString(CultureInfo.InvariantCulture));
    }

    [Fact]
    public void Decode_UnknownFormat_Throws() => Assert.Throws<InvalidDataException>(() => PatientFactsCodec.Decode([9, 0]));

    /// <summary>Builds distinct non-default values: every string unique, every list of two, every nullable set.</summary>
    private sealed class Filler
    {
        private int _next;

        public object Make(Type type)
        {
            var underlying = Nullable.GetUnderlyingType(type) ?? type;
            var n = ++_next;
            if (underlying == typeof(string))
            {
                return "s" + n.ToString(CultureInfo.InvariantCulture);
            }

            if (underlying == typeof(bool))
            {
                return n % 2 == 0;
            }

            if (underlying == typeof(int))
            {
                return n;
            }

            if (underlying == typeof(decimal))
            {
                return n + 0.25m;
            }

            if (underlying.IsEnum)
            {
                var values = Enum.GetValues(underlying);
                return values.GetValue(n % values.Length)!;
            }

            if (underlying.IsGenericType && underlying.GetGenericTypeDefinition() == typeof(IReadOnlyList<>))
            {
                var element = underlying.GetGenericArguments()[0];
                var list = (IList)Activator.CreateInstance(typeof(List<>).MakeGenericType(element))!;
                list.Add(Make(element));
                list.Add(Make(element));
                return list;
            }

            var constructor = underlying.GetConstructors().OrderByDescending(c => c.GetParameters().Length).First();
            var instance = constructor.Invoke([.. constructor.GetParameters().Select(p => Make(p.ParameterType))]);
            foreach (var property in underlying.GetProperties(BindingFlags.Public | BindingFlags.Instance).Where(p => p.CanWrite))
            {
                if (constructor.GetParameters().All(p => !string.Equals(p.Name, property.Name, StringComparison.Ordinal)))
                {
                    property.SetValue(instance, Make(property.PropertyType));
                }
            }

            return instance;
        }
    }
}
