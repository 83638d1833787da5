import { type LoggerInterface, logger, Warn } from "vega";

/**
 * A vega logger that collects warnings and errors instead of printing them, so that a chart that
 * vega finds questionable fails loudly in tests rather than printing to the console of a build.
 */
export function collectingLogger(messages: string[]): LoggerInterface {
  return logger(Warn, undefined, (_method, level, args) => {
    messages.push(`${level} ${args.map((arg) => String(arg)).join(" ")}`);
  });
}
