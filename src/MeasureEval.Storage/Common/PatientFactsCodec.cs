using System.Buffers;
using System.Text;
using MeasureEval.Core.Index;

namespace MeasureEval.Storage.Common;

/// <summary>
/// The stored form of one patient's index entry: a compact binary layout with a per-entry string table, since an entry
/// repeats the same code systems, codes and statuses many times. Reading the index is the floor under every population
/// evaluation, and this form decodes several times faster than JSON of the same content (DEVELOPERS.md has the figures).
/// </summary>
/// <remarks>
/// Layout (format 1): format byte; string count and strings (UTF-8, length-prefixed); then the entry, every string as a
/// reference (0 = null, n = table[n − 1]) and every count as a 7-bit varint. A property added to the index model must be
/// added here (and the format number raised): <c>PatientFactsCodecTests</c> fails until it is.
/// </remarks>
public static class PatientFactsCodec
{
    private const byte Format = 1;

    public static byte[] Encode(PatientFacts facts)
    {
        ArgumentNullException.ThrowIfNull(facts);
        var writer = new EntryWriter();
        writer.WriteEntry(facts);
        return writer.ToArray();
    }

    public static PatientFacts Decode(ReadOnlySpan<byte> data)
    {
        var reader = new EntryReader(data);
        return reader.ReadEntry();
    }

    private sealed class EntryWriter
    {
        private readonly ArrayBufferWriter<byte> _body = new(1024);
        private readonly Dictionary<string, int> _strings = new(StringComparer.Ordinal);
        private readonly List<string> _table = [];

        public void WriteEntry(PatientFacts facts)
        {
            String(facts.PatientId);
            if (facts.Demographics is { } d)
            {
                Byte(1);
                String(d.BirthDate);
                String(d.Gender);
                Bool(d.DeceasedBoolean);
                String(d.DeceasedDateTime);
                String(d.GeneralPractitioner);
                Bool(d.Active);
            }
            else
            {
                Byte(0);
            }

            Count(facts.Facts.Count);
            foreach (var fact in facts.Facts)
            {
                Fact(fact);
            }

            Count(facts.Coverages.Count);
            foreach (var coverage in facts.Coverages)
            {
                String(coverage.Id);
                String(coverage.Status);
                Count(coverage.Payors.Count);
                foreach (var payor in coverage.Payors)
                {
                    String(payor);
                }

                String(coverage.PeriodStart);
                String(coverage.PeriodEnd);
                Int(coverage.Order);
            }
        }

        public byte[] ToArray()
        {
            var header = new ArrayBufferWriter<byte>(256 + (_table.Count * 24));
            header.GetSpan(1)[0] = Format;
            header.Advance(1);
            Varint(header, (uint)_table.Count);
            foreach (var text in _table)
            {
                var length = Encoding.UTF8.GetByteCount(text);
                Varint(header, (uint)length);
                header.Advance(Encoding.UTF8.GetBytes(text, header.GetSpan(length)));
            }

            var result = new byte[header.WrittenCount + _body.WrittenCount];
            header.WrittenSpan.CopyTo(result);
            _body.WrittenSpan.CopyTo(result.AsSpan(header.WrittenCount));
            return result;
        }

        private void Fact(ClinicalFact fact)
        {
            String(fact.ResourceType);
            String(fact.Id);
            String(fact.VersionId);
            String(fact.Status);
            Codings(fact.Codes);
            Time(fact.Time);
            Time(fact.Abatement);
            String(fact.RecordedDate);
            Codings(fact.ClinicalStatus);
            Codings(fact.VerificationStatus);
            String(fact.Intent);
            if (fact.EncounterClass is { } encounterClass)
            {
                Byte(1);
                Coding(encounterClass);
            }
            else
            {
                Byte(0);
            }

            Codings(fact.DischargeDisposition);
            Bool(fact.IsSubpotent);
            Codings(fact.StatusReason);
            Codings(fact.DataAbsentReason);
            Byte(fact.HasValue ? (byte)1 : (byte)0);
            Quantity(fact.Quantity);
            Codings(fact.ValueCodes);
            Count(fact.Components.Count);
            foreach (var component in fact.Components)
            {
                Codings(component.Codes);
                Quantity(component.Quantity);
                Codings(component.DataAbsentReason);
            }
        }

        private void Time(FactTime? time)
        {
            if (time is null)
            {
                Byte(0);
                return;
            }

            Byte((byte)(1 + (int)time.Kind));
            String(time.Start);
            String(time.End);
            Quantity(time.Low);
            Quantity(time.High);
        }

        private void Quantity(FactQuantity? quantity)
        {
            if (quantity is null)
            {
                Byte(0);
                return;
            }

            if (quantity.Value is { } value)
            {
                Byte(2);
                Span<int> bits = stackalloc int[4];
                decimal.GetBits(value, bits);
                foreach (var part in bits)
                {
                    Varint(_body, (uint)part);
                }
            }
            else
            {
                Byte(1);
            }

            String(quantity.Comparator);
            String(quantity.Unit);
            String(quantity.System);
            String(quantity.Code);
        }

        private void Codings(IReadOnlyList<FactCoding> codings)
        {
            Count(codings.Count);
            foreach (var coding in codings)
            {
                Coding(coding);
            }
        }

        private void Coding(FactCoding coding)
        {
            String(coding.System);
            String(coding.Code);
        }

        private void String(string? text)
        {
            if (text is null)
            {
                Varint(_body, 0);
                return;
            }

            if (!_strings.TryGetValue(text, out var index))
            {
                index = _table.Count;
                _table.Add(text);
                _strings.Add(text, index);
            }

            Varint(_body, (uint)index + 1);
        }

        private void Bool(bool? value) => Byte(value switch { null => 0, false => 1, true => 2 });

        private void Int(int? value)
        {
            if (value is { } v)
            {
                Byte(1);
                Varint(_body, (uint)v);
            }
            else
            {
                Byte(0);
            }
        }

        private void Count(int count) => Varint(_body, (uint)count);

        private void Byte(byte value)
        {
            _body.GetSpan(1)[0] = value;
            _body.Advance(1);
        }

        private static void Varint(ArrayBufferWriter<byte> target, uint value)
        {
            var span = target.GetSpan(5);
            var written = 0;
            while (value >= 0x80)
            {
                span[written++] = (byte)(value | 0x80);
                value >>= 7;
            }

            span[written++] = (byte)value;
            target.Advance(written);
        }
    }

    private ref struct EntryReader
    {
        private readonly ReadOnlySpan<byte> _data;
        private string[] _table;
        private int _position;

        public EntryReader(ReadOnlySpan<byte> data)
        {
            _data = data;
            _table = [];
            _position = 0;
        }

        public PatientFacts ReadEntry()
        {
            if (_data.Length == 0 || _data[0] != Format)
            {
                throw new InvalidDataException($"A stored patient index entry has format {(_data.Length == 0 ? "(empty)" : _data[0])}, not {Format}.");
            }

            _position = 1;
            var count = (int)Varint();
            _table = new string[count];
            for (var i = 0; i < count; i++)
            {
                var length = (int)Varint();
                _table[i] = Encoding.UTF8.GetString(_data.Slice(_position, length));
                _position += length;
            }

            var patientId = String() ?? throw new InvalidDataException("A stored patient index entry has no patient id.");
            Demographics? demographics = null;
            if (Byte() == 1)
            {
                demographics = new Demographics
                {
                    BirthDate = String(),
                    Gender = String(),
                    DeceasedBoolean = Bool(),
                    DeceasedDateTime = String(),
                    GeneralPractitioner = String(),
                    Active = Bool(),
                };
            }

            var facts = new ClinicalFact[(int)Varint()];
            for (var i = 0; i < facts.Length; i++)
            {
                facts[i] = Fact();
            }

            var coverages = new CoverageFact[(int)Varint()];
            for (var i = 0; i < coverages.Length; i++)
            {
                var id = String() ?? throw new InvalidDataException("A stored coverage has no id.");
                var status = String();
                var payors = new string[(int)Varint()];
                for (var p = 0; p < payors.Length; p++)
                {
                    payors[p] = String() ?? string.Empty;
                }

                coverages[i] = new CoverageFact
                {
                    Id = id,
                    Status = status,
                    Payors = payors,
                    PeriodStart = String(),
                    PeriodEnd = String(),
                    Order = Int(),
                };
            }

            return new PatientFacts { PatientId = patientId, Demographics = demographics, Facts = facts, Coverages = coverages };
        }

        private ClinicalFact Fact()
        {
            var resourceType = String() ?? throw new InvalidDataException("A stored fact has no resource type.");
            var id = String() ?? throw new InvalidDataException("A stored fact has no id.");
            var fact = new ClinicalFact
            {
                ResourceType = resourceType,
                Id = id,
                VersionId = String(),
                Status = String(),
                Codes = Codings(),
                Time = Time(),
                Abatement = Time(),
                RecordedDate = String(),
                ClinicalStatus = Codings(),
                VerificationStatus = Codings(),
                Intent = String(),
                EncounterClass = Byte() == 1 ? Coding() : null,
                DischargeDisposition = Codings(),
                IsSubpotent = Bool(),
                StatusReason = Codings(),
                DataAbsentReason = Codings(),
                HasValue = Byte() == 1,
                Quantity = Quantity(),
                ValueCodes = Codings(),
                Components = Components(),
            };
            return fact;
        }

        private FactComponent[] Components()
        {
            var count = (int)Varint();
            if (count == 0)
            {
                return [];
            }

            var components = new FactComponent[count];
            for (var i = 0; i < count; i++)
            {
                components[i] = new FactComponent { Codes = Codings(), Quantity = Quantity(), DataAbsentReason = Codings() };
            }

            return components;
        }

        private FactTime? Time()
        {
            var kind = Byte();
            return kind == 0 ? null : new FactTime((TimeKind)(kind - 1), String(), String(), Quantity(), Quantity());
        }

        private FactQuantity? Quantity()
        {
            var tag = Byte();
            if (tag == 0)
            {
                return null;
            }

            decimal? value = null;
            if (tag == 2)
            {
                Span<int> bits = [(int)Varint(), (int)Varint(), (int)Varint(), (int)Varint()];
                value = new decimal(bits);
            }

            return new FactQuantity(value, String(), String(), String(), String());
        }

        private FactCoding[] Codings()
        {
            var count = (int)Varint();
            if (count == 0)
            {
                return [];
            }

            var codings = new FactCoding[count];
            for (var i = 0; i < count; i++)
            {
                codings[i] = Coding();
            }

            return codings;
        }

        private FactCoding Coding() => new(String(), String());

        private string? String()
        {
            var reference = Varint();
            return reference == 0 ? null : _table[reference - 1];
        }

        private bool? Bool() => Byte() switch { 0 => null, 1 => false, _ => true };

        private int? Int() => Byte() == 0 ? null : (int)Varint();

        private byte Byte() => _data[_position++];

        private uint Varint()
        {
            uint value = 0;
            var shift = 0;
            byte next;
            do
            {
                next = _data[_position++];
                value |= (uint)(next & 0x7F) << shift;
                shift += 7;
            }
            while ((next & 0x80) != 0);

            return value;
        }
    }
}
