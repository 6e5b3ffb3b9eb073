using System.Collections;
using Hl7.Fhir.Model;

namespace MeasureEval.Api.Bundles;

/// <summary>A reference found in a resource, with its FHIRPath location.</summary>
public sealed record LocatedReference(ResourceReference Reference, string Path);

/// <summary>Finds every Reference element in a resource tree, however deeply nested (extensions, backbone elements, contained resources).</summary>
public static class ReferenceWalker
{
    public static List<LocatedReference> Collect(Base root, string rootPath)
    {
        ArgumentNullException.ThrowIfNull(root);
        var found = new List<LocatedReference>();
        Walk(root, rootPath, found);
        return found;
    }

    private static void Walk(Base node, string path, List<LocatedReference> found)
    {
        if (node is ResourceReference reference && reference.Reference is not null)
        {
            found.Add(new LocatedReference(reference, path + ".reference"));
        }

        foreach (var (name, value) in node.EnumerateElements())
        {
            switch (value)
            {
                case PrimitiveType primitive when primitive.Extension.Count == 0:
                    break;
                case Base child:
                    Walk(child, $"{path}.{name}", found);
                    break;
                case string or byte[]:
                    break;
                case IEnumerable list:
                    var index = 0;
                    foreach (var item in list)
                    {
                        if (item is Base element and not PrimitiveType { Extension.Count: 0 })
                        {
                            Walk(element, $"{path}.{name}[{index}]", found);
                        }

                        index++;
                    }

                    break;
            }
        }
    }
}
