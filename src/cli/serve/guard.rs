//! Which requests the workbench answers: only those addressed to its own
//! loopback address (Host), sent from its own page (Origin,
//! Sec-Fetch-Site), and for changes JSON bodies of bounded size. This is
//! the protection against DNS rebinding (a foreign name resolving to
//! 127.0.0.1 still carries its own Host) and against other sites posting
//! to the workbench (their Origin is theirs; a form post cannot send
//! `application/json` without a preflight, which is refused).

/// Largest request body, bytes (a design file is a few kilobytes).
pub const MAX_BODY: usize = 256 * 1024;

/// What a request shows of itself, as read from its headers.
#[derive(Debug, Default, Clone, Copy)]
pub struct Seen<'a> {
    /// `GET`, `POST`, ...
    pub method: &'a str,
    /// The Host header.
    pub host: Option<&'a str>,
    /// The Origin header.
    pub origin: Option<&'a str>,
    /// The Sec-Fetch-Site header (sent by browsers).
    pub fetch_site: Option<&'a str>,
    /// The Content-Type header.
    pub content_type: Option<&'a str>,
    /// The declared body length, if any.
    pub length: Option<usize>,
}

/// Why a request is refused.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum Refused {
    /// The Host header is missing or names another host or port.
    #[error("refused: the Host header must be this workbench's own address ({0})")]
    ForeignHost(String),
    /// The Origin header names another site.
    #[error("refused: requests from other sites are not accepted (Origin {0})")]
    ForeignOrigin(String),
    /// The browser says the request comes from another site.
    #[error("refused: requests from other sites are not accepted (Sec-Fetch-Site {0})")]
    CrossSite(String),
    /// A change not sent as JSON.
    #[error("refused: send the body as application/json")]
    NotJson,
    /// The body is larger than [`MAX_BODY`].
    #[error("refused: the body is larger than {MAX_BODY} bytes")]
    TooLarge,
    /// A method other than GET and POST.
    #[error("refused: only GET and POST are served")]
    Method,
}

impl Refused {
    /// The HTTP status code.
    pub fn status(&self) -> u16 {
        match self {
            Refused::ForeignHost(_) | Refused::ForeignOrigin(_) | Refused::CrossSite(_) => 403,
            Refused::NotJson => 415,
            Refused::TooLarge => 413,
            Refused::Method => 405,
        }
    }
}

/// The host names the workbench answers to on `port`.
fn own_hosts(port: u16) -> [String; 2] {
    [format!("127.0.0.1:{port}"), format!("localhost:{port}")]
}

/// Checks a request to the workbench listening on 127.0.0.1:`port`.
pub fn check(port: u16, r: &Seen<'_>) -> Result<(), Refused> {
    if r.method != "GET" && r.method != "POST" {
        return Err(Refused::Method);
    }
    let hosts = own_hosts(port);
    let host = r.host.unwrap_or("").trim().to_ascii_lowercase();
    if !hosts.contains(&host) {
        return Err(Refused::ForeignHost(
            r.host.unwrap_or("missing").to_string(),
        ));
    }
    if let Some(origin) = r.origin {
        let o = origin.trim().to_ascii_lowercase();
        if !hosts.iter().any(|h| o == format!("http://{h}")) {
            return Err(Refused::ForeignOrigin(origin.to_string()));
        }
    }
    if let Some(site) = r.fetch_site
        && !matches!(site.trim(), "same-origin" | "none")
    {
        return Err(Refused::CrossSite(site.to_string()));
    }
    if r.method == "POST" {
        let json = r
            .content_type
            .and_then(|c| c.split(';').next())
            .is_some_and(|c| c.trim().eq_ignore_ascii_case("application/json"));
        if !json {
            return Err(Refused::NotJson);
        }
    }
    if r.length.is_some_and(|n| n > MAX_BODY) {
        return Err(Refused::TooLarge);
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn post<'a>() -> Seen<'a> {
        Seen {
            method: "POST",
            host: Some("127.0.0.1:4000"),
            origin: Some("http://127.0.0.1:4000"),
            fetch_site: Some("same-origin"),
            content_type: Some("application/json"),
            length: Some(10),
        }
    }

    #[test]
    fn own_page_passes() {
        assert_eq!(check(4000, &post()), Ok(()));
        let get = Seen {
            method: "GET",
            host: Some("localhost:4000"),
            ..Seen::default()
        };
        assert_eq!(check(4000, &get), Ok(()));
    }

    #[test]
    fn foreign_host_origin_site_type_and_size_are_refused() {
        let r = |s: Seen| check(4000, &s).unwrap_err().status();
        assert_eq!(
            r(Seen {
                host: Some("evil.example:4000"),
                ..post()
            }),
            403
        );
        assert_eq!(
            r(Seen {
                host: Some("127.0.0.1:4001"),
                ..post()
            }),
            403
        );
        assert_eq!(
            r(Seen {
                host: None,
                ..post()
            }),
            403
        );
        assert_eq!(
            r(Seen {
                origin: Some("http://evil.example"),
                ..post()
            }),
            403
        );
        assert_eq!(
            r(Seen {
                origin: Some("null"),
                ..post()
            }),
            403
        );
        assert_eq!(
            r(Seen {
                fetch_site: Some("cross-site"),
                ..post()
            }),
            403
        );
        assert_eq!(
            r(Seen {
                content_type: Some("text/plain"),
                ..post()
            }),
            415
        );
        assert_eq!(
            r(Seen {
                content_type: None,
                ..post()
            }),
            415
        );
        assert_eq!(
            r(Seen {
                length: Some(MAX_BODY + 1),
                ..post()
            }),
            413
        );
        assert_eq!(
            r(Seen {
                method: "PUT",
                ..post()
            }),
            405
        );
    }
}
