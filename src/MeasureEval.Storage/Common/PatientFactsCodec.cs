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
/// Layout (format 2): format byte; string count and strings (UTF-8, length-prefixed); then the entry, every string as a
/// reference (0 = null, n = table[n − 1]) and every count as a 7-bit varint. A clinical fact starts with a bit set of the
/// elements it has (<see cref="FactField"/>), and only those follow: most facts fill a handful of their twenty elements.
/// A property added to the index model must be added here and <see cref="Format"/> raised (stores rebuild their index
/// when it changes): <c>PatientFactsCodecTests</c> fails until it is.
/// </remarks>
public static class PatientFactsCodec
{
    /// <summary>The layout version; part of the index version a store records.</summary>
    public const byte Format = 2;

    [Flags]
    private enum FactField : uint
    {
        VersionId = 1 << 0,
        Status = 1 << 1,
        Codes = 1 << 2,
        Time = 1 << 3,
        Abatement = 1 << 4,
        RecordedDate = 1 << 5,
        ClinicalStatus = 1 << 6,
        VerificationStatus = 1 << 7,
        Intent = 1 << 8,
        EncounterClass = 1 << 9,
        DischargeDisposition = 1 << 10,
        IsSubpotent = 1 << 11,
        StatusReason = 1 << 12,
        DataAbsentReason = 1 << 13,
        HasValue = 1 << 14,
        Quantity = 1 << 15,
        ValueCodes = 1 << 16,
        Components = 1 << 17,
    }

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
            var fields = FieldsOf(fact);
            Varint(_body, (uint)fields);
            if (fields.HasFlag(FactField.VersionId))
            {
                String(fact.VersionId);
            }

            if (fields.HasFlag(FactField.Status))
            {
                String(fact.Status);
            }

            if (fields.HasFlag(FactField.Codes))
            {
                Codings(fact.Codes);
            }

            if (fields.HasFlag(FactField.Time))
            {
                Time(fact.Time);
            }

            if (fields.HasFlag(FactField.Abatement))
            {
                Time(fact.Abatement);
            }

            if (fields.HasFlag(FactField.RecordedDate))
            {
                String(fact.RecordedDate);
            }

            if (fields.HasFlag(FactField.ClinicalStatus))
            {
                Codings(fact.ClinicalStatus);
            }

            if (fields.HasFlag(FactField.VerificationStatus))
            {
                Codings(fact.VerificationStatus);
            }

            if (fields.HasFlag(FactField.Intent))
            {
                String(fact.Intent);
            }

            if (fields.HasFlag(FactField.EncounterClass))
            {
                Coding(fact.EncounterClass!);
            }

            if (fields.HasFlag(FactField.DischargeDisposition))
            {
                Codings(fact.DischargeDisposition);
            }

            if (fields.HasFlag(FactField.IsSubpotent))
            {
                Byte(fact.IsSubpotent == true ? (byte)1 : (byte)0);
            }

            if (fields.HasFlag(FactField.StatusReason))
            {
                Codings(fact.StatusReason);
            }

            if (fields.HasFlag(FactField.DataAbsentReason))
            {
                Codings(fact.DataAbsentReason);
            }

            if (fields.HasFlag(FactField.Quantity))
            {
                Quantity(fact.Quantity);
            }

            if (fields.HasFlag(FactField.ValueCodes))
            {
                Codings(fact.ValueCodes);
            }

            if (fields.HasFlag(FactField.Components))
            {
                Count(fact.Components.Count);
                foreach (var component in fact.Components)
                {
                    Codings(component.Codes);
                    Quantity(component.Quantity);
                    Codings(component.DataAbsentReason);
                }
            }
        }

        private static FactField FieldsOf(ClinicalFact fact)
        {
            FactField fields = 0;
            fields |= fact.VersionId is null ? 0 : FactField.VersionId;
            fields |= fact.Status is null ? 0 : FactField.Status;
            fields |= fact.Codes.Count == 0 ? 0 : FactField.Codes;
            fields |= fact.Time is null ? 0 : FactField.Time;
            fields |= fact.Abatement is null ? 0 : FactField.Abatement;
            fields |= fact.RecordedDate is null ? 0 : FactField.RecordedDate;
            fields |= fact.ClinicalStatus.Count == 0 ? 0 : FactField.ClinicalStatus;
            fields |= fact.VerificationStatus.Count == 0 ? 0 : FactField.VerificationStatus;
            fields |= fact.Intent is null ? 0 : FactField.Intent;
            fields |= fact.EncounterClass is null ? 0 : FactField.EncounterClass;
            fields |= fact.DischargeDisposition.Count == 0 ? 0 : FactField.DischargeDisposition;
            fields |= fact.IsSubpotent is null ? 0 : FactField.IsSubpotent;
            fields |= fact.StatusReason.Count == 0 ? 0 : FactField.StatusReason;
            fields |= fact.DataAbsentReason.Count == 0 ? 0 : FactField.DataAbsentReason;
            fields |= fact.HasValue ? FactField.HasValue : 0;
            fields |= fact.Quantity is null ? 0 : FactField.Quantity;
            fields |= fact.ValueCodes.Count == 0 ? 0 : FactField.ValueCodes;
            fields |= fact.Components.Count == 0 ? 0 : FactField.Components;
            return fields;
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
        private Dictionary<ulong, FactCoding[]>? _singles;

        public EntryReader(ReadOnlySpan<byte> data)
        {
            _data = data;
            _table = [];
            _position = 0;
            _singles = null;
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
            var fields = (FactField)Varint();
            return new ClinicalFact
            {
                ResourceType = resourceType,
                Id = id,
                VersionId = fields.HasFlag(FactField.VersionId) ? String() : null,
                Status = fields.HasFlag(FactField.Status) ? String() : null,
                Codes = fields.HasFlag(FactField.Codes) ? Codings() : [],
                Time = fields.HasFlag(FactField.Time) ? Time() : null,
                Abatement = fields.HasFlag(FactField.Abatement) ? Time() : null,
                RecordedDate = fields.HasFlag(FactField.RecordedDate) ? String() : null,
                ClinicalStatus = fields.HasFlag(FactField.ClinicalStatus) ? Codings() : [],
                VerificationStatus = fields.HasFlag(FactField.VerificationStatus) ? Codings() : [],
                Intent = fields.HasFlag(FactField.Intent) ? String() : null,
                EncounterClass = fields.HasFlag(FactField.EncounterClass) ? Coding() : null,
                DischargeDisposition = fields.HasFlag(FactField.DischargeDisposition) ? Codings() : [],
                IsSubpotent = fields.HasFlag(FactField.IsSubpotent) ? Byte() == 1 : null,
                StatusReason = fields.HasFlag(FactField.StatusReason) ? Codings() : [],
                DataAbsentReason = fields.HasFlag(FactField.DataAbsentReason) ? Codings() : [],
                HasValue = fields.HasFlag(FactField.HasValue),
                Quantity = fields.HasFlag(FactField.Quantity) ? Quantity() : null,
                ValueCodes = fields.HasFlag(FactField.ValueCodes) ? Codings() : [],
                Components = fields.HasFlag(FactField.Components) ? Components() : [],
            };
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

            if (count == 1)
            {
                return SingleCoding();
            }

            var codings = new FactCoding[count];
            for (var i = 0; i < count; i++)
            {
                codings[i] = Coding();
            }

            return codings;
        }

        private FactCoding Coding() => new(String(), String());

        /// <summary>One-coding lists repeat across an entry's facts (the same code, status, class): share one instance each.</summary>
        private FactCoding[] SingleCoding()
        {
            var system = Varint();
            var code = Varint();
            var key = ((ulong)system << 32) | code;
            _singles ??= [];
            if (!_singles.TryGetValue(key, out var codings))
            {
                codings = [new FactCoding(Lookup(system), Lookup(code))];
                _singles.Add(key, codings);
            }

            return codings;
        }

        private string? String() => Lookup(Varint());

        private string? Lookup(uint reference) => reference == 0 ? null : _table[reference - 1];

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
