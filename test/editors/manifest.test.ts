// The extension manifest (package.json) against the code that serves it: every contributed
// command is one the client registers, every setting the server reads is declared with a
// description, and the files the manifest points at are the ones that ship.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ClientCommands } from '../../client/src/commandIds';
import { SETTINGS_SECTION, SettingKeys, SERVER_COMMANDS } from '../../server/src/shared/protocol';

const root = join(__dirname, '..', '..');
const manifest = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));

describe('package.json contributes', () => {
  it('contributes exactly the commands the client registers, all in the one category', () => {
    const contributed = manifest.contributes.commands.map((c: { command: string }) => c.command).sort();
    expect(contributed).toEqual(Object.values(ClientCommands).sort());
    for (const c of manifest.contributes.commands) expect(c.category).toBe('eigenlens');
  });

  it('does not contribute server-side command ids (the language client registers those itself)', () => {
    const contributed = new Set(manifest.contributes.commands.map((c: { command: string }) => c.command));
    for (const id of SERVER_COMMANDS) expect(contributed.has(id)).toBe(false);
  });

  it('declares every setting the server reads, prefixed, described and typed', () => {
    const properties = manifest.contributes.configuration.properties as Record<string, Record<string, unknown>>;
    for (const key of Object.values(SettingKeys)) {
      const setting = properties[`${SETTINGS_SECTION}.${key}`];
      expect(setting, key).toBeDefined();
      expect(typeof setting.description).toBe('string');
      expect(setting.type).toBeDefined();
      // documentsKept counts the window's open documents, so it is a window setting; the rest may differ per folder.
      expect(setting.scope).toBe(key === SettingKeys.documentsKept ? 'window' : 'resource');
    }
    for (const key of Object.keys(properties)) expect(key.startsWith(`${SETTINGS_SECTION}.`)).toBe(true);
    // The language client reads `<client id>.trace.server`; the id is 'eigenlens'.
    expect(properties['eigenlens.trace.server']).toBeDefined();
  });

  it('offers only the discretizations the server accepts', () => {
    const methods = manifest.contributes.configuration.properties['eigenlens.discretizeMethod'].enum;
    expect(methods).toEqual(['zoh', 'tustin', 'euler', 'backward-euler']);
  });

  it('activates on every language the client serves and declares untrusted-workspace support', () => {
    for (const lang of ['python', 'typescript', 'javascript', 'lti']) {
      expect(manifest.activationEvents).toContain(`onLanguage:${lang}`);
    }
    expect(manifest.capabilities.untrustedWorkspaces.supported).toBe(true);
  });

  it('registers the lti language and grammar at the syntax files the package ships', () => {
    const lti = manifest.contributes.languages.find((l: { id: string }) => l.id === 'lti');
    expect(lti.extensions).toEqual(['.lti']);
    expect(lti.configuration).toBe('./syntaxes/lti.language-configuration.json');
    const grammar = manifest.contributes.grammars.find((g: { language: string }) => g.language === 'lti');
    expect(grammar).toMatchObject({ scopeName: 'source.lti', path: './syntaxes/lti.tmLanguage.json' });
    const ignore = readFileSync(join(root, '.vscodeignore'), 'utf8');
    expect(ignore).toMatch(/^!syntaxes\/\*\.json$/m);
    expect(ignore).toMatch(/^!dist\/server\.js$/m);
    expect(manifest.main).toBe('./dist/client.js');
  });

  it('points at an icon that exists, is a PNG and ships', () => {
    const icon = readFileSync(join(root, manifest.icon));
    expect([...icon.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(readFileSync(join(root, '.vscodeignore'), 'utf8')).toContain(`!${manifest.icon}`);
  });
});
