import { cloneElement, isValidElement, type ReactElement, type ReactNode } from 'react';

// A stand-in for expo-router in component tests: navigation calls are recorded, links
// render their child with an onPress that records the target.

export const navigation: { pushed: unknown[]; replaced: unknown[] } = { pushed: [], replaced: [] };

export function resetNavigation(): void {
  navigation.pushed = [];
  navigation.replaced = [];
}

export const useRouter = () => ({
  push: (href: unknown) => navigation.pushed.push(href),
  replace: (href: unknown) => navigation.replaced.push(href),
  back: () => undefined,
});

export const usePathname = () => '/';
export const useLocalSearchParams = () => ({});

export function Link({ href, children, asChild }: { href: unknown; children: ReactNode; asChild?: boolean }) {
  if (asChild && isValidElement(children)) return cloneElement(children as ReactElement<{ onPress?: () => void }>, { onPress: () => navigation.pushed.push(href) });
  return <>{children}</>;
}

export const Redirect = ({ href }: { href: unknown }) => {
  navigation.replaced.push(href);
  return null;
};
