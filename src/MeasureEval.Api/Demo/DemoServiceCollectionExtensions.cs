namespace MeasureEval.Api.Demo;

public static class DemoServiceCollectionExtensions
{
    public const string Switch = "--demo";

    /// <summary>Turns the bare <c>--demo</c> flag into configuration before the host parses arguments.</summary>
    public static string[] ExpandDemoFlag(string[] args)
    {
        ArgumentNullException.ThrowIfNull(args);
        return [.. args.Select(a => a == Switch ? $"--{DemoOptions.Section}:{nameof(DemoOptions.Load)}=true" : a)];
    }

    public static IServiceCollection AddMeasureEvalDemo(this IServiceCollection services)
    {
        services.AddOptions<DemoOptions>().BindConfiguration(DemoOptions.Section).ValidateOnStart();
        services.AddSingleton<DemoLoader>();
        services.AddHostedService(sp => sp.GetRequiredService<DemoLoader>());
        return services;
    }
}
