/** The setup commands' names and help text, apart from their code so `help` loads no database module. */
export const SETUP_COMMANDS = ["schools", "sites", "payloads", "sensors", "calibrations", "layouts"] as const;
export type SetupCommand = (typeof SETUP_COMMANDS)[number];

export function isSetupCommand(word: string | undefined): word is SetupCommand {
  return (SETUP_COMMANDS as readonly string[]).includes(word ?? "");
}

export const SETUP_COMMANDS_HELP = `  schools|sites|payloads|sensors|calibrations|layouts list [--school ID] [--sensor ID]
                               one line per item: id, then its name and school (calibrations: its sensor)
  schools|sites|payloads|sensors|calibrations|layouts show <id>
                               the item as JSON
  schools|sites|payloads|sensors|calibrations|layouts create (--json '<body>' | --file body.json)
                               the same body as POST /api/v1/setup/<item> (schools: {name, slug?});
                               prints the new id; a refused body prints what is wrong and exits 1`;
