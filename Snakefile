# cinderclock: survey catalogue of white-dwarf candidates -> vetted parameters and ages.
# Run from the repository root:  snakemake --cores 2   (see README.md). The same file is the
# installed workflow that a project folder uses as a Snakemake module (cinderclock init).
from cinderclock.config import check_config

# The invented sample's configuration, unless a configuration of one's own is named
# (snakemake --configfile mine.yaml): that file then stands alone, with defaults from the schema,
# and nothing of the sample's. As a module, the project folder passes its own config instead.
if not workflow.overwrite_configfiles:
    configfile: "config/config.yaml"
check_config(config)  # JSON Schema validation with defaults (workflow/schemas/config.schema.yaml)

report: "workflow/report/workflow.rst"

include: "workflow/rules/common.smk"
include: "workflow/rules/ingest.smk"
include: "workflow/rules/models.smk"
include: "workflow/rules/select.smk"
include: "workflow/rules/luminosity.smk"
include: "workflow/rules/mass.smk"
include: "workflow/rules/cooling.smk"
include: "workflow/rules/uncertainty.smk"
include: "workflow/rules/final.smk"
include: "workflow/rules/handoff.smk"
include: "workflow/rules/population.smk"


rule all:
    default_target: True
    input:
        rules.final.output,
        rules.handoff.output,
        rules.population_age.output,
        rules.figures.output,
        rules.run_summary.output,
