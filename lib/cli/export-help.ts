/** Help text of the export, backup and restore commands (its own module so `help` loads no export code). */
export const EXPORT_HELP = `  export [options]             write a dataset (CSV table, JSON, or zip data package)
      --source archive|flight|climatology   (default archive)
      --format csv|json|package|netcdf      (default package; netcdf: NetCDF-4/CF profiles, .nc)
      --table flights|runs|layers|levels|calibrations|raw-files|query-values   (CSV only; default flights)
      --raw                                 include the raw logger files (package only)
      --licence CC-BY-4.0|CC0-1.0|CC-BY-SA-4.0|ODC-By-1.0|ODbL-1.0   (default CC-BY-4.0)
      --title TEXT  --flight ID (source flight)
      --query "metric=tropopause-altitude&groupBy=season"   the Archive or Climatology page's parameters
      --out FILE                            (default: a name like lapsebank-archive-20250101-120000.zip)
  backup <file>                write the whole archive (every table and raw file) into one zip
  restore <file>               load a backup into an EMPTY database (refuses otherwise), all or
                               nothing: every entry is checked first, then written in one transaction`;
