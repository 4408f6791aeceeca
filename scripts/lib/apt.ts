// Debian packages the project needs on a fresh machine. Only what is missing is installed, and
// `apt-get update` runs once, right before the first install (a new image has no package lists).
import { execFileSync, spawnSync } from 'node:child_process';
import { info, warn } from './log';

export interface DebianNeed {
	pkg: string;
	present: () => boolean;
}

export function commandExists(command: string): boolean {
	return spawnSync('sh', ['-c', `command -v ${command}`], { stdio: 'ignore' }).status === 0;
}

export function debianPackageInstalled(pkg: string): boolean {
	const result = spawnSync('dpkg-query', ['-W', '-f=${Status}', pkg], { encoding: 'utf8' });
	return result.status === 0 && result.stdout.includes('install ok installed');
}

export function ensureDebianPackages(needs: DebianNeed[]): void {
	const missing = needs.filter((need) => !need.present()).map((need) => need.pkg);
	if (!missing.length) return;
	if (process.getuid?.() !== 0) {
		warn(`missing Debian packages (install them as root): ${missing.join(' ')}`);
		return;
	}
	info(`installing Debian packages: ${missing.join(' ')}`);
	const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
	execFileSync('apt-get', ['update'], { stdio: 'inherit', env });
	execFileSync('apt-get', ['install', '-y', ...missing], { stdio: 'inherit', env });
}
