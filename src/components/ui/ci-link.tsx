export type CiLinkProps = { url: string | null };

/** Only links a person can follow: a CI address that is not http(s) is not linked at all. */
function safeHttpUrl(url: string | null): string | null {
  return url && /^https?:\/\//i.test(url) ? url : null;
}

/** " · CI build page", linking back to the build in the CI, when the upload gave one. */
export function CiLink({ url }: CiLinkProps) {
  const href = safeHttpUrl(url);
  if (!href) return null;
  return (
    <>
      {' '}
      ·{' '}
      <a
        href={href}
        className="text-sky-700 hover:underline dark:text-sky-400"
        rel="noopener noreferrer"
        target="_blank"
      >
        CI build page
      </a>
    </>
  );
}
