import assert from 'node:assert/strict';
import * as path from 'node:path';
import { resolveLibraryLink } from '../../../extension/host/resolveLibraryLink';

const ROOT = '/srv/larkspur/postmortem-repo';

describe('resolveLibraryLink', () => {
  it('resolves a workspace-relative postmortem path inside the folder', () => {
    assert.deepEqual(resolveLibraryLink('postmortems/2026-01-14-basket-checkout-slow.md', ROOT, path.posix),
      { kind: 'inside', absolutePath: `${ROOT}/postmortems/2026-01-14-basket-checkout-slow.md` });
  });

  it('removes dot segments before deciding (RFC 3986 §5.2.4 example "mid/content=5/../6" → "mid/6")', () => {
    assert.deepEqual(resolveLibraryLink('mid/content=5/../6', ROOT, path.posix), { kind: 'inside', absolutePath: `${ROOT}/mid/6` });
  });

  it('refuses a path that climbs out of the workspace (path traversal, CWE-22)', () => {
    const target = resolveLibraryLink('postmortems/../../../../etc/passwd', ROOT, path.posix);
    assert.equal(target.kind, 'outside');
    if (target.kind === 'outside') assert.match(target.reason, /resolves to \/etc\/passwd, outside the workspace folder/);
  });

  it('refuses an absolute path elsewhere (RFC 3986 §5.2.4 example "/a/b/c/./../../g" → "/a/g")', () => {
    const target = resolveLibraryLink('/a/b/c/./../../g', ROOT, path.posix);
    assert.deepEqual(target.kind, 'outside');
    if (target.kind === 'outside') assert.match(target.reason, /resolves to \/a\/g,/);
  });

  it('refuses a sibling folder that merely shares the prefix (common practice: compare path segments, not strings)', () => {
    assert.equal(resolveLibraryLink(`${ROOT}-old/notes.md`, ROOT, path.posix).kind, 'outside');
  });

  it('accepts an absolute path inside the folder', () => {
    assert.deepEqual(resolveLibraryLink(`${ROOT}/exports/basket.csv`, ROOT, path.posix), { kind: 'inside', absolutePath: `${ROOT}/exports/basket.csv` });
  });

  it('reads a file URI (RFC 8089 §2: file:///path) and checks it like a path', () => {
    assert.deepEqual(resolveLibraryLink(`file://${ROOT}/postmortems/pm%20one.md`, ROOT, path.posix), { kind: 'inside', absolutePath: `${ROOT}/postmortems/pm one.md` });
    assert.equal(resolveLibraryLink('file:///etc/hosts', ROOT, path.posix).kind, 'outside');
  });

  it('refuses web and other URI schemes (RFC 3986 §3.1 scheme syntax: http, https, mailto)', () => {
    for (const link of ['https://wiki.larkspur.example/pm/42', 'http://wiki.larkspur.example/pm', 'mailto:oncall@larkspur.example']) {
      const target = resolveLibraryLink(link, ROOT, path.posix);
      assert.equal(target.kind, 'outside', link);
      if (target.kind === 'outside') assert.match(target.reason, /link, not a file in the workspace/);
    }
  });

  it('treats a Windows drive letter as a path, not a URI scheme (common practice: C:\\ is a drive)', () => {
    const root = 'C:\\work\\larkspur';
    assert.deepEqual(resolveLibraryLink('C:\\work\\larkspur\\postmortems\\pm.md', root, path.win32), { kind: 'inside', absolutePath: 'C:\\work\\larkspur\\postmortems\\pm.md' });
    assert.equal(resolveLibraryLink('D:\\elsewhere\\pm.md', root, path.win32).kind, 'outside');
    assert.deepEqual(resolveLibraryLink('postmortems/pm.md', root, path.win32), { kind: 'inside', absolutePath: 'C:\\work\\larkspur\\postmortems\\pm.md' });
  });

  it('refuses an empty link and the folder itself with a reason', () => {
    for (const link of ['', '   ', '.', './']) {
      const target = resolveLibraryLink(link, ROOT, path.posix);
      assert.equal(target.kind, 'outside', JSON.stringify(link));
    }
  });
});
