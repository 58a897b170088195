import fs from 'node:fs';
import path from 'node:path';
import Handlebars from 'handlebars';
import { formatInZone } from '@shared/time-zone';

/**
 * Letters and e-mails from Handlebars templates in templates/: `NAME.html.hbs` and `NAME.text.hbs`,
 * the HTML wrapped in the shared layout partial. Templates receive view models prepared by services,
 * never entities.
 */
const TEMPLATE_DIR = [path.join(__dirname, '..', '..', 'templates'), path.join(__dirname, '..', '..', '..', 'templates')].find(
  (dir) => fs.existsSync(path.join(dir, 'layout.html.hbs')),
);

const hbs = Handlebars.create();
/**
 * `{{dateTime closesAt timeZone}}` (`seconds=true` for a receipt time): the one date-time format of
 * shared/time-zone.ts. Services pass ISO instants and the procedure's zone, never formatted times.
 */
hbs.registerHelper('dateTime', (at: unknown, timeZone: unknown, options: Handlebars.HelperOptions) => {
  if ((typeof at !== 'string' && !(at instanceof Date)) || typeof timeZone !== 'string') throw new TypeError('dateTime needs an instant and a time zone');
  return formatInZone(at, timeZone, { seconds: options.hash['seconds'] === true });
});
const cache = new Map<string, Handlebars.TemplateDelegate>();

function load(file: string): Handlebars.TemplateDelegate {
  let compiled = cache.get(file);
  if (!compiled) {
    if (!TEMPLATE_DIR) throw new Error('templates/ folder not found');
    // Plain-text parts are not HTML: no escaping there (a link keeps its `&`).
    compiled = hbs.compile(fs.readFileSync(path.join(TEMPLATE_DIR, file), 'utf8'), {
      strict: true,
      noEscape: file.endsWith('.text.hbs'),
    });
    cache.set(file, compiled);
  }
  return compiled;
}

let partialsRegistered = false;
function registerPartials(): void {
  if (partialsRegistered) return;
  hbs.registerPartial('layout', load('layout.html.hbs'));
  partialsRegistered = true;
}

export interface RenderedMail {
  subject: string;
  text: string;
  html: string;
}

/** Renders template `name` with `model`; `subject` is given by the caller (it is part of the view). */
export function renderMail(name: string, subject: string, model: object): RenderedMail {
  registerPartials();
  const view = { ...model, subject };
  return { subject, html: load(`${name}.html.hbs`)(view), text: load(`${name}.text.hbs`)(view) };
}
