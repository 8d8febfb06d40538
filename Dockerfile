# LaneBaseline in a container, for sharded batch runs (see docs/scaling.md).
# The build runs only the project's own set-up script (the one the README and CI use) and a publish.
# ReadyToRun: the assemblies are compiled ahead of time, so a short score or merge run does not wait for the JIT
# (docs/scaling.md, "Score throughput").
FROM mcr.microsoft.com/dotnet/sdk:10.0-bookworm-slim AS build
WORKDIR /src
COPY . .
RUN LANEBASELINE_NO_BROWSER=1 LANEBASELINE_NO_TOOL=1 bash scripts/setup.sh \
 && dotnet publish src/LaneBaseline.Cli -c Release --use-current-runtime --self-contained false -p:PublishReadyToRun=true -o /app

FROM mcr.microsoft.com/dotnet/runtime:10.0-bookworm-slim
WORKDIR /src
COPY scripts/setup.sh scripts/setup.sh
RUN LANEBASELINE_NO_BROWSER=1 LANEBASELINE_NO_TOOL=1 SKIP_DOTNET_CHECK=1 bash scripts/setup.sh
COPY --from=build /app /app
COPY configs /app/configs
ENTRYPOINT ["dotnet", "/app/lanebaseline.dll"]
